import { describe, expect, it } from 'vitest';
import { PUSH_USAGE, runPush, type PushIo } from './push';
import { plantedFaultAdder } from '../lib/quantum/templates';

// The push command against a recorded fake server: what it sends and what it exits with. The
// circuit is the invented demo adder with its planted fault (rotation c·a[1] → b[3] at pi/8).
// The server's side (stale refusal, recomputed divergence, the drawn board) is tested against
// the real app in tests/e2e/push.spec.ts.

const CIRCUIT = 'c'.repeat(24);
const TRACE = 't'.repeat(24);

function fakeIo(doc: unknown, opts: { traceStatus?: number; traceError?: string } = {}) {
	const sent: { method: string; path: string; body: unknown; auth: string | null }[] = [];
	const out: string[] = [];
	const io: PushIo = {
		out: (t) => out.push(t),
		err: (t) => out.push(`ERR ${t}`),
		readFile: () => JSON.stringify(doc),
		fetch: (async (url: URL, init: RequestInit) => {
			const path = url.pathname;
			const body = init.body ? JSON.parse(String(init.body)) : undefined;
			sent.push({ method: init.method ?? 'GET', path, body, auth: new Headers(init.headers).get('authorization') });
			const reply = (status: number, json: unknown) => new Response(JSON.stringify(json), { status, headers: { 'content-type': 'application/json' } });
			if (path === '/api/me') return reply(200, { teams: [{ slug: 'lab' }] });
			if (path === '/api/teams/lab/members') return reply(200, { members: [{ id: 'r'.repeat(24), email: 'rev@lab.example' }] });
			if (path === '/api/teams/lab/traces') {
				if (opts.traceStatus) return reply(opts.traceStatus, { error: { message: opts.traceError } });
				return reply(201, {
					id: TRACE,
					circuit: { id: CIRCUIT, version: 5, addedVersion: true },
					firstDivergence: { step: 13, label: 'b[3]', message: 'q8 (b[3]) at step 13: …' },
					lastStep: 30,
					links: { replay: '/teams/lab/traces/x/replay', circuit: '/teams/lab/circuits/c' }
				});
			}
			if (path === `/api/teams/lab/circuits/${CIRCUIT}/checks`) return reply(201, { status: 'x' });
			if (path === '/api/teams/lab/reports') return reply(201, { id: 'r'.repeat(24), links: { page: '/teams/lab/reports/r', replay: '/x' } });
			return reply(404, { error: { message: 'no such route' } });
		}) as unknown as typeof fetch
	};
	return { io, sent, out };
}

const env = { ORRERY_TOKEN: 'orr_fromenv' };
const args = (spec: string, target = ['--circuit', CIRCUIT, '--base', '4']) => ['adder.json', ...target, '--spec', spec, '--server', 'http://orrery.test', '--json'];

describe('orrery push', () => {
	it('names its target, sends its base version, opens the report at the server\'s divergence; exit 1', async () => {
		const { io, sent, out } = fakeIo(plantedFaultAdder());
		expect(await runPush([...args('b = b + c*a mod 16'), '--reviewer', 'REV@lab.example'], io, env)).toBe(1);
		// No verdict is sent: the server queues its own check of the pushed version when the trace arrives.
		expect(sent.map((s) => `${s.method} ${s.path}`)).toEqual(['GET /api/me', 'GET /api/teams/lab/members', 'POST /api/teams/lab/traces', 'POST /api/teams/lab/reports']);
		expect(sent.every((s) => s.auth === 'Bearer orr_fromenv')).toBe(true);
		const trace = sent[2].body as { circuitId: string; baseVersion: number; force: boolean; document: { specs: string[] }; inputs: { values: Record<string, string> } };
		expect(trace).toMatchObject({ circuitId: CIRCUIT, baseVersion: 4, force: false });
		expect(trace.document.specs).toContain('b = b + c*a mod 16');
		// The fault needs c=1 and a[1]=1, so the first failing input has both.
		expect(trace.inputs.values.c).toBe('1');
		expect((BigInt(trace.inputs.values.a) >> 1n) & 1n).toBe(1n);
		const report = sent[3].body as { step: number; severity: string; description: string; reviewerId: string };
		expect(report.step).toBe(13);
		expect(report.reviewerId).toBe('r'.repeat(24));
		expect(report.description).toContain('step 13 on b[3]');
		expect(JSON.parse(out[0])).toMatchObject({ ok: false, circuit: { id: CIRCUIT, version: 5 }, report: { id: 'r'.repeat(24), page: 'http://orrery.test/teams/lab/reports/r' } });
	});

	it('--new makes a new circuit with that title; a passing push sends no verdict (the server checks) and opens no report; exit 0', async () => {
		const fixed = plantedFaultAdder();
		fixed.body = fixed.body.map((i) => (i.id === 'rot-b3-a1' ? { ...i, angle: 'pi/4' } : i)) as typeof fixed.body;
		const { io, sent } = fakeIo(fixed);
		expect(await runPush(args('b = b + c*a mod 16', ['--new', 'Adder from CI']), io, env)).toBe(0);
		const trace = sent.find((s) => s.path === '/api/teams/lab/traces')!.body as { newTitle: string; circuitId?: string; document: { title: string } };
		expect(trace.newTitle).toBe('Adder from CI');
		expect(trace.circuitId).toBeUndefined();
		expect(sent.map((s) => s.path).some((p) => p.endsWith('/checks'))).toBe(false);
		expect(sent.map((s) => s.path)).not.toContain('/api/teams/lab/reports');
	});

	it('refuses to guess a target: no target, both targets, --circuit without --base; exit 2 before any request', async () => {
		for (const [target, says] of [
			[[], /--circuit ID --base N .* or --new/],
			[['--circuit', CIRCUIT, '--base', '1', '--new', 'x'], /not both/],
			[['--circuit', CIRCUIT], /--base N/],
			[['--circuit', 'adder', '--base', '1'], /not a circuit id/],
			[['--circuit', CIRCUIT, '--base', 'two'], /--base: expected a version number/]
		] as [string[], RegExp][]) {
			const { io, sent, out } = fakeIo(plantedFaultAdder());
			expect(await runPush(['adder.json', ...target, '--spec', 'b = b + c*a mod 16', '--server', 'http://orrery.test'], io, env)).toBe(2);
			expect(out.at(-1)).toMatch(says);
			expect(sent).toEqual([]);
		}
	});

	it('a stale base is refused with the server\'s sentence naming both versions; --force sends force; exit 2', async () => {
		const msg = '"Adder" is at version 5, but your file is based on version 4. …';
		const { io, out } = fakeIo(plantedFaultAdder(), { traceStatus: 409, traceError: msg });
		expect(await runPush(args('b = b + c*a mod 16').filter((a) => a !== '--json'), io, env)).toBe(2);
		expect(out.at(-1)).toBe(`ERR refused: ${msg}`);
		const forced = fakeIo(plantedFaultAdder());
		await runPush(args('b = b + c*a mod 16', ['--circuit', CIRCUIT, '--force']), forced.io, env);
		expect(forced.sent.find((s) => s.path === '/api/teams/lab/traces')!.body).toMatchObject({ circuitId: CIRCUIT, force: true });
	});

	it('exits 2 with a sentence naming ORRERY_TOKEN when no token is given; --help shows a CI example with it', async () => {
		const { io, out } = fakeIo(plantedFaultAdder());
		expect(await runPush(args('b = b + c*a mod 16'), io, {})).toBe(2);
		expect(out.at(-1)).toContain('ORRERY_TOKEN');
		expect(await runPush(['adder.json', '--circuit', CIRCUIT, '--base', '1', '--server', 'http://orrery.test'], io, env)).toBe(2);
		expect(PUSH_USAGE).toMatch(/ORRERY_TOKEN=\$\{\{ secrets\.ORRERY_TOKEN \}\} npm run orrery -- push/);
	});
});
