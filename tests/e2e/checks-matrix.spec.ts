import { expect, test, type APIRequestContext } from '@playwright/test';
import { formHeaders } from './support/accounts';
import { ACTORS, faultyAdder, makeCrew, type Actor, type Crew } from './support/review';
import { makeTemplate } from '../../src/lib/quantum/templates';

// Server checks over HTTP for owner, engineer, reviewer, viewer, a signed-in stranger and no
// session (the role table: everyone in the team reads checks; owner and engineer queue and cancel
// them), and the one rule this issue exists for: a client cannot set a circuit's verdict.
// The built app runs against the throwaway MariaDB and Redis, with the worker that npm test starts.

let crew: Crew;
test.describe.configure({ mode: 'serial' });
test.beforeAll(async () => {
	test.setTimeout(120_000);
	crew = await makeCrew('Check matrix');
});
test.afterAll(async () => crew?.dispose());

const s = () => crew.slug;
const api = (a: Actor) => crew.ctx[a];
const member = (owner: number, engineer: number, reviewer: number, viewer: number, stranger: number, anon: number): Record<Actor, number> => ({ owner, engineer, reviewer, viewer, stranger, anon });

async function upload(c: APIRequestContext, doc: object): Promise<string> {
	const res = await c.post(`/teams/${s()}/circuits?/upload`, { headers: formHeaders, multipart: { file: { name: 'circuit.json', mimeType: 'application/json', buffer: Buffer.from(JSON.stringify(doc)) } } });
	expect(res.status()).toBe(303);
	return /\/circuits\/([a-z2-7]{24})/.exec(res.headers().location ?? '')![1];
}

type Check = { id: string; status: string; by: string; method: string | null; cases: number; failed: number };
async function latest(circuitId: string): Promise<Check> {
	return (await (await api('viewer').get(`/api/teams/${s()}/circuits/${circuitId}/checks`)).json()).latest;
}
async function waitForVerdict(circuitId: string): Promise<Check> {
	let c: Check | null = null;
	await expect
		.poll(async () => (c = await latest(circuitId)).status, { timeout: 120_000, intervals: [500, 1000] })
		.toMatch(/^(pass|fail|error|cancelled)$/);
	return c!;
}

let small = '';
/** A 10-bit adder: 2^20 inputs, long enough to still be running when it is cancelled. Invented test circuit. */
const big = () => makeTemplate('adder', `Matrix big adder ${Date.now()}`, 10);
async function bigCheck(): Promise<string> {
	const id = await upload(api('owner'), big());
	return (await latest(id)).id;
}

type Row = { name: string; expect: Record<Actor, number>; run: (a: Actor) => Promise<number> };
const rows: Row[] = [
	{ name: 'GET circuits (JSON list)', expect: member(200, 200, 200, 200, 404, 401), run: async (a) => (await api(a).get(`/api/teams/${s()}/circuits`)).status() },
	{ name: 'GET circuit checks', expect: member(200, 200, 200, 200, 404, 401), run: async (a) => (await api(a).get(`/api/teams/${s()}/circuits/${(small ||= await upload(api('owner'), makeTemplate('adder', `Matrix small ${Date.now()}`, 3)))}/checks`)).status() },
	{ name: 'POST circuit checks (queue one)', expect: member(202, 202, 403, 403, 404, 401), run: async (a) => (await api(a).post(`/api/teams/${s()}/circuits/${small}/checks`, { data: {} })).status() },
	{ name: 'GET one check with progress', expect: member(200, 200, 200, 200, 404, 401), run: async (a) => (await api(a).get(`/api/teams/${s()}/checks/${(await latest(small)).id}`)).status() },
	{
		name: 'POST cancel',
		expect: member(200, 200, 403, 403, 404, 401),
		run: async (a) => {
			const id = await bigCheck();
			const status = (await api(a).post(`/api/teams/${s()}/checks/${id}/cancel`)).status();
			// A refused cancel leaves the check queued: the owner cancels it, so the worker stays free.
			if (status !== 200) expect((await api('owner').post(`/api/teams/${s()}/checks/${id}/cancel`)).status()).toBe(200);
			return status;
		}
	}
];

for (const row of rows) {
	test(`check matrix: ${row.name}`, async () => {
		test.setTimeout(180_000);
		const got = {} as Record<Actor, number>;
		for (const a of ACTORS) got[a] = await row.run(a);
		expect(got).toEqual(row.expect);
	});
}

test('a client cannot set the verdict: ok:true is only a command-line report and the server finds the fault', async () => {
	test.setTimeout(180_000);
	const id = await upload(api('engineer'), faultyAdder(`Matrix faulty ${Date.now()}`));
	const claim = await api('engineer').post(`/api/teams/${s()}/circuits/${id}/checks`, { data: { version: 1, ok: true, method: 'sweep+proof', cases: 512, failed: 0, exhaustive: true } });
	// Taken only as what the command line reported: the server queues its own check instead.
	expect(claim.status()).toBe(202);
	const claimed = await claim.json();
	expect(claimed.reported).toEqual({ by: 'command line', ok: true, verdictSet: false });
	expect(claimed.message).toContain('cannot set a verdict');
	const verdict = await waitForVerdict(id);
	// The demo adder's planted rotation (c·a[1] → b[3] at pi/8 instead of pi/4) fails for inputs with c = 1 and a[1] = 1.
	expect([verdict.status, verdict.by]).toEqual(['fail', 'server']);
	expect(verdict.failed).toBeGreaterThan(0);
	const list = await (await api('viewer').get(`/api/teams/${s()}/circuits?perPage=100`)).json();
	const row = list.circuits.find((c: { id: string }) => c.id === id);
	expect(row.check).toMatchObject({ status: 'fail', by: 'server', method: 'sweep+proof', cases: 512 });
	expect(typeof row.check.finishedAt).toBe('string');
	expect(Object.keys(list)).toEqual(['circuits', 'page', 'perPage', 'total', 'pages']);
});

test('a cancelled check says so and gives no verdict', async () => {
	test.setTimeout(120_000);
	const checkId = await bigCheck();
	const res = await api('engineer').post(`/api/teams/${s()}/checks/${checkId}/cancel`);
	expect(res.status()).toBe(200);
	expect((await res.json()).check.status).toBe('cancelled');
	expect((await api('engineer').post(`/api/teams/${s()}/checks/${checkId}/cancel`)).status()).toBe(409);
});
