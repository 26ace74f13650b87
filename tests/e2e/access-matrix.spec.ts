import { expect, test, type APIRequestContext } from '@playwright/test';
import { formHeaders, freshEmail, mailTo, newContext, pathOf, signUp, waitForMail } from './support/accounts';

// Every protected action and endpoint of issue 3 against every kind of caller, over HTTP against
// the built app (hooks, CSRF check, guard, actions and endpoints all in the path). Each cell is
// the status code a plain browser form post or API call gets. 303 on a page means "sent to sign-in".

type Actor = 'owner' | 'engineer' | 'reviewer' | 'viewer' | 'stranger' | 'anon';
const ACTORS: Actor[] = ['engineer', 'reviewer', 'viewer', 'stranger', 'anon', 'owner'];
const ctx = {} as Record<Actor, APIRequestContext>;
const ids = {} as Record<Actor, string>;
let slug = '';

test.describe.configure({ mode: 'serial' });

test.beforeAll(async () => {
	test.setTimeout(120_000);
	for (const a of ACTORS) ctx[a] = await newContext();
	const emails = {} as Record<Actor, string>;
	for (const a of ACTORS) {
		if (a === 'anon') continue;
		emails[a] = freshEmail(a);
		await signUp(ctx[a], emails[a], `Matrix ${a}`);
	}
	const created = await ctx.owner.post('/api/teams', { data: { name: `Matrix Lab ${Date.now()}` } });
	expect(created.status()).toBe(201);
	slug = (await created.json()).slug;
	for (const a of ['engineer', 'reviewer', 'viewer'] as const) {
		const inv = await ctx.owner.post(`/api/teams/${slug}/invitations`, { data: { email: emails[a], role: a } });
		expect(inv.status()).toBe(201);
		const mail = await waitForMail(emails[a], '/invite/');
		const accept = await ctx[a].post(`${pathOf(mail.link)}?/accept`, { form: {}, headers: formHeaders });
		expect(accept.status()).toBe(303);
	}
	const members = await (await ctx.owner.get(`/api/teams/${slug}/members`)).json();
	for (const m of members.members as { id: string; role: Actor; email: string }[]) ids[m.role] = m.id;
	expect(Object.keys(ids).sort()).toEqual(['engineer', 'owner', 'reviewer', 'viewer']);
	// The stranger is signed in and has a team of their own, but not this one.
	expect((await ctx.stranger.post('/api/teams', { data: { name: 'Elsewhere Lab' } })).status()).toBe(201);
});

test.afterAll(async () => {
	for (const a of ACTORS) await ctx[a]?.dispose();
});

const form = (c: APIRequestContext, path: string, data: Record<string, string> = {}) => c.post(path, { form: data, headers: formHeaders });
const page = (c: APIRequestContext, path: string) => c.get(path, { headers: { accept: 'text/html' } });

/** Make an invitation as the owner and return its id (for the revoke cells). */
async function openInvitation(): Promise<string> {
	const res = await ctx.owner.post(`/api/teams/${slug}/invitations`, { data: { email: freshEmail('pending'), role: 'viewer' } });
	expect(res.status()).toBe(201);
	return (await res.json()).id;
}

/** One extra member (invited and accepted over HTTP) that the others try to remove and the owner, last, does. */
let spare: Promise<string> | null = null;
function spareMember(): Promise<string> {
	spare ??= makeSpareMember();
	return spare;
}
async function makeSpareMember(): Promise<string> {
	const c = await newContext();
	const email = freshEmail('spare');
	await signUp(c, email, 'Spare member');
	await ctx.owner.post(`/api/teams/${slug}/invitations`, { data: { email, role: 'viewer' } });
	const mail = await waitForMail(email, '/invite/');
	expect((await form(c, `${pathOf(mail.link)}?/accept`)).status()).toBe(303);
	const me = await (await c.get('/api/me')).json();
	await c.dispose();
	return me.user.id;
}

/** A second team of the owner with the engineer, reviewer and viewer in it (for the account?/leave cells). */
let second: Promise<string> | null = null;
function secondTeam(): Promise<string> {
	second ??= (async () => {
		const made = await ctx.owner.post('/api/teams', { data: { name: `Matrix Second Lab ${Date.now()}` } });
		const s2 = (await made.json()).slug as string;
		for (const a of ['engineer', 'reviewer', 'viewer'] as const) {
			const me = await (await ctx[a].get('/api/me')).json();
			const before = (await mailTo(me.user.email)).length;
			await ctx.owner.post(`/api/teams/${s2}/invitations`, { data: { email: me.user.email, role: a } });
			let mine = await mailTo(me.user.email);
			for (let i = 0; i < 60 && mine.length <= before; i++) mine = (await new Promise((r) => setTimeout(r, 150)), await mailTo(me.user.email));
			const link = mine.at(-1)!.links.find((l) => l.includes('/invite/'))!;
			expect((await form(ctx[a], `${pathOf(link)}?/accept`)).status()).toBe(303);
		}
		return s2;
	})();
	return second;
}

async function tokenOf(a: Actor, role = 'viewer'): Promise<string> {
	const res = await ctx[a].post(`/teams/${slug}/tokens?/create`, { form: { name: `cell-${a}-${Date.now()}`, role }, headers: { origin: formHeaders.origin, accept: 'application/json', 'x-sveltekit-action': 'true' } });
	const body = await res.json();
	expect(body.type).toBe('success');
	// devalue output: the 24-character id is the first such string in it.
	return (JSON.parse(body.data) as unknown[]).find((v) => typeof v === 'string' && /^[a-z2-7]{24}$/.test(v)) as string;
}

type Row = { name: string; expect: Record<Actor, number>; run: (a: Actor) => Promise<number> };
const member = (owner: number, engineer: number, reviewer: number, viewer: number, stranger: number, anon: number): Record<Actor, number> => ({
	owner,
	engineer,
	reviewer,
	viewer,
	stranger,
	anon
});

const rows: Row[] = [
	{ name: 'GET /teams (page)', expect: member(200, 200, 200, 200, 200, 303), run: async (a) => (await page(ctx[a], '/teams')).status() },
	{ name: 'GET /teams/{slug} (page)', expect: member(200, 200, 200, 200, 404, 303), run: async (a) => (await page(ctx[a], `/teams/${slug}`)).status() },
	{ name: 'GET /teams/{slug}/members (page)', expect: member(200, 200, 200, 200, 404, 303), run: async (a) => (await page(ctx[a], `/teams/${slug}/members`)).status() },
	{ name: 'GET /teams/{slug}/tokens (page)', expect: member(200, 200, 200, 200, 404, 303), run: async (a) => (await page(ctx[a], `/teams/${slug}/tokens`)).status() },
	{ name: 'GET /api/me', expect: member(200, 200, 200, 200, 200, 401), run: async (a) => (await ctx[a].get('/api/me')).status() },
	{
		name: 'POST /api/teams',
		expect: member(201, 201, 201, 201, 201, 401),
		run: async (a) => (await ctx[a].post('/api/teams', { data: { name: `Side lab of ${a}` } })).status()
	},
	{ name: 'GET /api/teams/{slug}/members', expect: member(200, 200, 200, 200, 404, 401), run: async (a) => (await ctx[a].get(`/api/teams/${slug}/members`)).status() },
	{
		name: 'POST /api/teams/{slug}/invitations',
		expect: member(201, 403, 403, 403, 404, 401),
		run: async (a) => (await ctx[a].post(`/api/teams/${slug}/invitations`, { data: { email: freshEmail('api-inv'), role: 'viewer' } })).status()
	},
	{ name: 'action teams?/create', expect: member(303, 303, 303, 303, 303, 401), run: async (a) => (await form(ctx[a], '/teams?/create', { name: `Form lab of ${a}` })).status() },
	{
		name: 'action members?/invite',
		expect: member(200, 403, 403, 403, 404, 401),
		run: async (a) => (await form(ctx[a], `/teams/${slug}/members?/invite`, { email: freshEmail('form-inv'), role: 'reviewer' })).status()
	},
	{
		name: 'action members?/revokeInvite',
		expect: member(200, 403, 403, 403, 404, 401),
		run: async (a) => (await form(ctx[a], `/teams/${slug}/members?/revokeInvite`, { invitationId: await openInvitation() })).status()
	},
	{
		name: 'action members?/changeRole',
		expect: member(200, 403, 403, 403, 404, 401),
		run: async (a) => (await form(ctx[a], `/teams/${slug}/members?/changeRole`, { userId: ids.viewer, role: 'viewer' })).status()
	},
	{
		name: 'action members?/remove',
		expect: member(200, 403, 403, 403, 404, 401),
		run: async (a) => (await form(ctx[a], `/teams/${slug}/members?/remove`, { userId: await spareMember() })).status()
	},
	{
		name: 'action tokens?/create',
		expect: member(200, 200, 200, 403, 404, 401),
		run: async (a) => (await form(ctx[a], `/teams/${slug}/tokens?/create`, { name: `matrix-${a}`, role: 'viewer' })).status()
	},
	{
		name: "action tokens?/revoke (the owner's token)",
		expect: member(200, 403, 403, 403, 404, 401),
		run: async (a) => (await form(ctx[a], `/teams/${slug}/tokens?/revoke`, { tokenId: await tokenOf('owner') })).status()
	},
	{
		name: 'action tokens?/revoke (own token)',
		expect: member(200, 200, 200, 0, 0, 0),
		run: async (a) => (await form(ctx[a], `/teams/${slug}/tokens?/revoke`, { tokenId: await tokenOf(a) })).status()
	},
	// The account page (issue 18): a person's own settings; every signed-in person, nobody else.
	{ name: 'GET /account (page)', expect: member(200, 200, 200, 200, 200, 303), run: async (a) => (await page(ctx[a], '/account')).status() },
	{ name: 'action account?/name', expect: member(200, 200, 200, 200, 200, 401), run: async (a) => (await form(ctx[a], '/account?/name', { name: `Matrix ${a}` })).status() },
	{ name: 'action account?/mail', expect: member(200, 200, 200, 200, 200, 401), run: async (a) => (await form(ctx[a], '/account?/mail', { reportMail: 'on' })).status() },
	{ name: 'action account?/signOutOthers', expect: member(200, 200, 200, 200, 200, 401), run: async (a) => (await form(ctx[a], '/account?/signOutOthers')).status() },
	{
		name: 'action account?/password (wrong current password)',
		expect: member(400, 400, 400, 400, 400, 401),
		run: async (a) => (await form(ctx[a], '/account?/password', { currentPassword: 'not-my-password', password: 'another-passphrase-1', confirm: 'another-passphrase-1' })).status()
	},
	{
		name: 'action account?/delete (wrong current password)',
		expect: member(400, 400, 400, 400, 400, 401),
		run: async (a) => (await form(ctx[a], '/account?/delete', { currentPassword: 'not-my-password', confirm: 'delete my account' })).status()
	},
	{
		name: 'action account?/leave (a second team; the owner is its only owner)',
		expect: member(409, 200, 200, 200, 404, 401),
		run: async (a) => (await form(ctx[a], '/account?/leave', { team: await secondTeam() })).status()
	},
	// Last: leaving takes the member out. The only owner may not leave.
	{ name: 'action members?/leave', expect: member(409, 303, 303, 303, 404, 401), run: async (a) => (await form(ctx[a], `/teams/${slug}/members?/leave`)).status() }
];

for (const row of rows) {
	test(`matrix: ${row.name}`, async () => {
		const got = {} as Record<Actor, number>;
		const want = {} as Record<Actor, number>;
		for (const a of ACTORS) {
			if (row.expect[a] === 0) continue; // no such cell (e.g. a viewer has no token of their own)
			want[a] = row.expect[a];
			got[a] = await row.run(a);
		}
		expect(got).toEqual(want);
	});
}

test('matrix: after the cells, the team is as the cells left it', async () => {
	const members = await (await ctx.owner.get(`/api/teams/${slug}/members`)).json();
	expect(members.members.map((m: { role: string }) => m.role)).toEqual(['owner']);
	// The owner's own anon-side check: a stranger still cannot tell the team exists.
	const r = await ctx.stranger.get(`/api/teams/${slug}/members`);
	expect(await r.json()).toEqual({ error: { code: 'not_found', message: 'No such team, or you are not a member of it.' } });
});
