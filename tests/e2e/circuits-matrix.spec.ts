import { expect, test, type APIRequestContext } from '@playwright/test';
import { baseURL } from '../../playwright.config';
import { formHeaders } from './support/accounts';
import { ACTORS, makeCrew, type Actor, type Crew } from './support/review';
import { makeTemplate } from '../../src/lib/quantum/templates';

// Issue 6's role matrix: every circuits page, form action and endpoint for owner, engineer,
// reviewer, viewer, a signed-in stranger and no session, over HTTP against the built app. The
// role table (DESIGN.md): owner and engineer edit circuits; reviewer and viewer only look.
// 303 on a page = sent to sign-in; 303 on an action = done and redirected to the new circuit.

let crew: Crew;
test.describe.configure({ mode: 'serial' });
test.beforeAll(async () => {
	test.setTimeout(120_000);
	crew = await makeCrew('Circuit matrix');
});
test.afterAll(async () => crew?.dispose());

const s = () => crew.slug;
const api = (a: Actor) => crew.ctx[a];
const member = (owner: number, engineer: number, reviewer: number, viewer: number, stranger: number, anon: number): Record<Actor, number> => ({ owner, engineer, reviewer, viewer, stranger, anon });
const form = (c: APIRequestContext, path: string, data: Record<string, string>) => c.post(path, { form: data, headers: formHeaders });
const html = (c: APIRequestContext, path: string) => c.get(path, { headers: { accept: 'text/html' } });
const adderJson = () => JSON.stringify(makeTemplate('adder', `Matrix adder ${Date.now()}`));

/** A fresh circuit made by the owner through the create action; returns its id. */
async function newCircuit(): Promise<string> {
	const res = await form(api('owner'), `/teams/${s()}/circuits?/create`, { title: `Matrix ${Date.now()}`, template: 'adder', bits: '3' });
	expect(res.status()).toBe(303);
	return /\/circuits\/([a-z2-7]{24})/.exec(res.headers().location ?? '')![1];
}

type Row = { name: string; expect: Record<Actor, number>; run: (a: Actor) => Promise<number> };
let shared = '';
const rows: Row[] = [
	{ name: 'page circuits', expect: member(200, 200, 200, 200, 404, 303), run: async (a) => (await html(api(a), `/teams/${s()}/circuits`)).status() },
	{ name: 'page workbench', expect: member(200, 200, 200, 200, 404, 303), run: async (a) => (await html(api(a), `/teams/${s()}/circuits/${(shared ||= await newCircuit())}`)).status() },
	{ name: 'action circuits?/create', expect: member(303, 303, 403, 403, 404, 401), run: async (a) => (await form(api(a), `/teams/${s()}/circuits?/create`, { title: `by ${a}`, template: 'blank', bits: '3' })).status() },
	{
		name: 'action circuits?/upload',
		expect: member(303, 303, 403, 403, 404, 401),
		run: async (a) =>
			(await api(a).post(`/teams/${s()}/circuits?/upload`, { headers: formHeaders, multipart: { file: { name: 'adder.json', mimeType: 'application/json', buffer: Buffer.from(adderJson()) } } })).status()
	},
	{ name: 'action circuits?/duplicate', expect: member(200, 200, 403, 403, 404, 401), run: async (a) => (await form(api(a), `/teams/${s()}/circuits?/duplicate`, { id: shared || (shared = await newCircuit()) })).status() },
	{ name: 'action circuits?/delete', expect: member(200, 200, 403, 403, 404, 401), run: async (a) => (await form(api(a), `/teams/${s()}/circuits?/delete`, { id: await newCircuit() })).status() },
	{
		name: 'action workbench?/save',
		expect: member(200, 200, 403, 403, 404, 401),
		run: async (a) => (await form(api(a), `/teams/${s()}/circuits/${await newCircuit()}?/save`, { base: '1', document: adderJson(), message: `by ${a}` })).status()
	},
	{ name: 'action workbench?/saveCopy', expect: member(303, 303, 403, 403, 404, 401), run: async (a) => (await form(api(a), `/teams/${s()}/circuits/${shared}?/saveCopy`, { document: adderJson() })).status() },
	{ name: 'GET export', expect: member(200, 200, 200, 200, 404, 401), run: async (a) => (await api(a).get(`/api/teams/${s()}/circuits/${shared}/export?format=qasm3`)).status() },
	{
		name: 'POST checks (queue a server check)',
		expect: member(202, 202, 403, 403, 404, 401),
		run: async (a) => (await api(a).post(`/api/teams/${s()}/circuits/${shared}/checks`, { data: { version: 1 } })).status()
	}
];

for (const row of rows) {
	test(`circuit matrix: ${row.name}`, async () => {
		const got = {} as Record<Actor, number>;
		for (const a of ACTORS) got[a] = await row.run(a);
		expect(got).toEqual(row.expect);
	});
}

test('a stale save is refused with 409 and a message, and the first save stands', async () => {
	const id = await newCircuit();
	const first = await form(api('owner'), `/teams/${s()}/circuits/${id}?/save`, { base: '1', document: adderJson(), message: 'first' });
	expect(first.status()).toBe(200);
	const second = await api('engineer').post(`/teams/${s()}/circuits/${id}?/save`, {
		form: { base: '1', document: adderJson(), message: 'second' },
		headers: { origin: baseURL, accept: 'application/json', 'x-sveltekit-action': 'true' }
	});
	const body = await second.json();
	expect(body.type).toBe('failure');
	expect(body.status).toBe(409);
	expect(body.data).toContain('while you were editing version 1');
	const exported = await (await api('owner').get(`/api/teams/${s()}/circuits/${id}/export?format=json&version=2`)).json();
	expect(exported.title).toMatch(/^Matrix adder/);
	expect((await api('owner').get(`/api/teams/${s()}/circuits/${id}/export?format=json&version=3`)).status()).toBe(404);
});

test('the circuits table shows the server check, marked as the server verdict', async () => {
	const page = await (await html(api('viewer'), `/teams/${s()}/circuits`)).text();
	expect(page).toContain('Server check');
	expect(page).toContain('(server)');
});

test('an unusable document is refused with the JSON path, and nothing is saved', async () => {
	const id = await newCircuit();
	const doc = JSON.parse(adderJson());
	doc.body[1].addend = '9bad';
	const res = await api('owner').post(`/teams/${s()}/circuits/${id}?/save`, {
		form: { base: '1', document: JSON.stringify(doc) },
		headers: { origin: baseURL, accept: 'application/json', 'x-sveltekit-action': 'true' }
	});
	const body = await res.json();
	expect(body.status).toBe(400);
	expect(body.data).toContain('body[1].addend');
	expect((await api('owner').get(`/api/teams/${s()}/circuits/${id}/export?format=json&version=2`)).status()).toBe(404);
});
