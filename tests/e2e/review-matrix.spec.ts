import { baseURL } from '../../playwright.config';
import { expect, test, type APIRequestContext } from '@playwright/test';
import { formHeaders } from './support/accounts';
import { ACTORS, FAULT_INPUTS, makeCrew, pushTrace, TINY_PNG, type Actor, type Crew } from './support/review';

// Issue 7's role matrix: every new endpoint and form action for owner, engineer, reviewer, viewer,
// a signed-in stranger and no session, over HTTP against the built app. Each cell is the status
// the caller gets. The role table is src/lib/permissions.ts (DESIGN.md: owner traces create and
// delete, reports all; engineer traces create, reports create and edit; reviewer replay,
// annotate, comment, change status; viewer view and replay only). 303 on a page = sent to sign-in.

let crew: Crew;
let trace: { id: string; circuit: { id: string; version: number } };
let reportId = '';
let snapshotId = '';
let breakpointId = '';

test.describe.configure({ mode: 'serial' });

test.beforeAll(async () => {
	test.setTimeout(120_000);
	crew = await makeCrew('Review matrix');
	trace = await pushTrace(crew.ctx.owner, crew.slug, `Matrix adder ${Date.now()}`);
	reportId = await newReport();
	const withSnap = await crew.ctx.owner.post(`/api/teams/${crew.slug}/reports`, {
		headers: { origin: baseURL }, // multipart is a form content type: SvelteKit's CSRF check wants the Origin
		multipart: { report: JSON.stringify({ traceId: trace.id, step: 13, title: 'with a snapshot' }), snapshot: { name: 'snap.png', mimeType: 'image/png', buffer: TINY_PNG } }
	});
	expect(withSnap.status()).toBe(201);
	const got = await (await crew.ctx.owner.get(`/api/teams/${crew.slug}/reports/${(await withSnap.json()).id}`)).json();
	snapshotId = got.report.snapshot.id;
	breakpointId = await newBreakpoint();
});

test.afterAll(async () => crew?.dispose());

const s = () => crew.slug;
const api = (a: Actor) => crew.ctx[a];
const member = (owner: number, engineer: number, reviewer: number, viewer: number, stranger: number, anon: number): Record<Actor, number> => ({ owner, engineer, reviewer, viewer, stranger, anon });
const form = (c: APIRequestContext, path: string, data: Record<string, string>) => c.post(path, { form: data, headers: formHeaders });
const html = (c: APIRequestContext, path: string) => c.get(path, { headers: { accept: 'text/html' } });

async function newReport(): Promise<string> {
	const res = await crew.ctx.owner.post(`/api/teams/${crew.slug}/reports`, { data: { traceId: trace.id, step: 13, title: 'A fixture report', severity: 'high' } });
	expect(res.status(), await res.text()).toBe(201);
	return (await res.json()).id;
}
async function newBreakpoint(): Promise<string> {
	const res = await crew.ctx.owner.post(`/api/teams/${crew.slug}/breakpoints`, { data: { circuitId: trace.circuit.id, version: trace.circuit.version, breakpoint: { kind: 'gate', gate: 12, note: 'fixture' } } });
	expect(res.status(), await res.text()).toBe(201);
	return (await res.json()).breakpoint.id;
}
async function newTrace(): Promise<string> {
	const res = await crew.ctx.owner.post(`/api/teams/${crew.slug}/traces`, { data: { circuitId: trace.circuit.id, version: trace.circuit.version, inputs: FAULT_INPUTS } });
	expect(res.status()).toBe(201);
	return (await res.json()).id;
}
async function revisionOf(id: string): Promise<number> {
	return (await (await crew.ctx.owner.get(`/api/teams/${crew.slug}/reports/${id}`)).json()).report.revision;
}

type Row = { name: string; expect: Record<Actor, number>; run: (a: Actor) => Promise<number> };
const rows: Row[] = [
	// Traces
	{ name: 'GET /api/teams/{slug}/traces', expect: member(200, 200, 200, 200, 404, 401), run: async (a) => (await api(a).get(`/api/teams/${s()}/traces?diverged=yes&sort=circuit`)).status() },
	{
		name: 'POST /api/teams/{slug}/traces (saved version, server computes)',
		expect: member(201, 201, 403, 403, 404, 401),
		run: async (a) => (await api(a).post(`/api/teams/${s()}/traces`, { data: { circuitId: trace.circuit.id, version: trace.circuit.version, inputs: FAULT_INPUTS } })).status()
	},
	{ name: 'GET /api/teams/{slug}/traces/{id}', expect: member(200, 200, 200, 200, 404, 401), run: async (a) => (await api(a).get(`/api/teams/${s()}/traces/${trace.id}`)).status() },
	{ name: 'DELETE /api/teams/{slug}/traces/{id}', expect: member(204, 403, 403, 403, 404, 401), run: async (a) => (await api(a).delete(`/api/teams/${s()}/traces/${await newTrace()}`)).status() },
	// Breakpoints
	{
		name: 'GET /api/teams/{slug}/breakpoints?circuit&version',
		expect: member(200, 200, 200, 200, 404, 401),
		run: async (a) => (await api(a).get(`/api/teams/${s()}/breakpoints?circuit=${trace.circuit.id}&version=${trace.circuit.version}`)).status()
	},
	{
		name: 'POST /api/teams/{slug}/breakpoints',
		expect: member(201, 201, 403, 403, 404, 401),
		run: async (a) =>
			(await api(a).post(`/api/teams/${s()}/breakpoints`, { data: { circuitId: trace.circuit.id, version: trace.circuit.version, breakpoint: { kind: 'divergence', qubit: null, tolerance: 0, note: `by ${a}` } } })).status()
	},
	{
		name: 'PATCH /api/teams/{slug}/breakpoints/{id} (annotate)',
		expect: member(200, 200, 200, 403, 404, 401),
		run: async (a) => (await api(a).patch(`/api/teams/${s()}/breakpoints/${await newBreakpoint()}`, { data: { note: `**${a}** was here`, revision: 1 } })).status()
	},
	{ name: 'POST /api/teams/{slug}/breakpoints/{id}/comments', expect: member(201, 201, 201, 403, 404, 401), run: async (a) => (await api(a).post(`/api/teams/${s()}/breakpoints/${breakpointId}/comments`, { data: { body: `seen by ${a}` } })).status() },
	{ name: 'DELETE /api/teams/{slug}/breakpoints/{id}', expect: member(204, 403, 403, 403, 404, 401), run: async (a) => (await api(a).delete(`/api/teams/${s()}/breakpoints/${await newBreakpoint()}`)).status() },
	// Reports
	{ name: 'GET /api/teams/{slug}/reports', expect: member(200, 200, 200, 200, 404, 401), run: async (a) => (await api(a).get(`/api/teams/${s()}/reports?status=open&sort=severity`)).status() },
	{ name: 'POST /api/teams/{slug}/reports', expect: member(201, 201, 403, 403, 404, 401), run: async (a) => (await api(a).post(`/api/teams/${s()}/reports`, { data: { traceId: trace.id, step: 13, title: `by ${a}` } })).status() },
	{ name: 'GET /api/teams/{slug}/reports/{id}', expect: member(200, 200, 200, 200, 404, 401), run: async (a) => (await api(a).get(`/api/teams/${s()}/reports/${reportId}`)).status() },
	{
		name: 'PATCH /api/teams/{slug}/reports/{id} (status)',
		expect: member(200, 200, 200, 403, 404, 401),
		run: async (a) => (await api(a).patch(`/api/teams/${s()}/reports/${await newReport()}`, { data: { status: 'confirmed', revision: 1 } })).status()
	},
	{
		name: 'PATCH /api/teams/{slug}/reports/{id} (assignee, severity)',
		expect: member(200, 200, 403, 403, 404, 401),
		run: async (a) => (await api(a).patch(`/api/teams/${s()}/reports/${await newReport()}`, { data: { assigneeId: crew.ids.reviewer, severity: 'low', revision: 1 } })).status()
	},
	{ name: 'POST /api/teams/{slug}/reports/{id}/comments', expect: member(201, 201, 201, 403, 404, 401), run: async (a) => (await api(a).post(`/api/teams/${s()}/reports/${reportId}/comments`, { data: { body: `comment by ${a}` } })).status() },
	{ name: 'DELETE /api/teams/{slug}/reports/{id}', expect: member(204, 403, 403, 403, 404, 401), run: async (a) => (await api(a).delete(`/api/teams/${s()}/reports/${await newReport()}`)).status() },
	{ name: 'GET /api/teams/{slug}/attachments/{id}', expect: member(200, 200, 200, 200, 404, 401), run: async (a) => (await api(a).get(`/api/teams/${s()}/attachments/${snapshotId}`)).status() },
	// Pages
	{ name: 'GET /teams/{slug}/traces (page)', expect: member(200, 200, 200, 200, 404, 303), run: async (a) => (await html(api(a), `/teams/${s()}/traces`)).status() },
	{ name: 'GET /teams/{slug}/traces/{id}/replay (page)', expect: member(200, 200, 200, 200, 404, 303), run: async (a) => (await html(api(a), `/teams/${s()}/traces/${trace.id}/replay?step=13`)).status() },
	{ name: 'GET /teams/{slug}/reports (page)', expect: member(200, 200, 200, 200, 404, 303), run: async (a) => (await html(api(a), `/teams/${s()}/reports`)).status() },
	{ name: 'GET /teams/{slug}/reports/{id} (page)', expect: member(200, 200, 200, 200, 404, 303), run: async (a) => (await html(api(a), `/teams/${s()}/reports/${reportId}`)).status() },
	// Form actions on the report page
	{ name: 'action reports/{id}?/comment', expect: member(200, 200, 200, 403, 404, 401), run: async (a) => (await form(api(a), `/teams/${s()}/reports/${reportId}?/comment`, { body: `form comment by ${a}` })).status() },
	{
		name: 'action reports/{id}?/status',
		expect: member(200, 200, 200, 403, 404, 401),
		run: async (a) => {
			const id = await newReport();
			return (await form(api(a), `/teams/${s()}/reports/${id}?/status`, { status: 'confirmed', revision: String(await revisionOf(id)) })).status();
		}
	},
	{
		name: 'action reports/{id}?/people',
		expect: member(200, 200, 403, 403, 404, 401),
		run: async (a) => {
			const id = await newReport();
			return (await form(api(a), `/teams/${s()}/reports/${id}?/people`, { assigneeId: crew.ids.engineer, reviewerId: crew.ids.reviewer, severity: 'critical', revision: '1' })).status();
		}
	}
];

for (const row of rows) {
	test(`review matrix: ${row.name}`, async () => {
		const got = {} as Record<Actor, number>;
		const want = {} as Record<Actor, number>;
		for (const a of ACTORS) {
			want[a] = row.expect[a];
			got[a] = await row.run(a);
		}
		expect(got).toEqual(want);
	});
}

test('review matrix: API tokens carry the lesser of token and member role', async () => {
	const mint = async (a: Actor, role: string) => {
		const res = await api(a).post(`/teams/${s()}/tokens?/create`, { form: { name: `dbg-${a}-${role}-${Date.now()}`, role }, headers: { origin: formHeaders.origin, accept: 'application/json', 'x-sveltekit-action': 'true' } });
		const body = await res.json();
		expect(body.type).toBe('success');
		return (JSON.parse(body.data) as unknown[]).find((v) => typeof v === 'string' && /^orr_[a-z2-7]{32}$/.test(v)) as string;
	};
	const engineerToken = await mint('engineer', 'engineer');
	const viewerToken = await mint('owner', 'viewer');
	const auth = (t: string) => ({ authorization: `Bearer ${t}` });
	const post = (t: string) => api('anon').post(`/api/teams/${s()}/traces`, { headers: auth(t), data: { circuitId: trace.circuit.id, version: trace.circuit.version, inputs: FAULT_INPUTS } });
	expect((await post(engineerToken)).status()).toBe(201);
	expect((await post(viewerToken)).status()).toBe(403);
	expect((await api('anon').get(`/api/teams/${s()}/traces/${trace.id}`, { headers: auth(viewerToken) })).status()).toBe(200);
});
