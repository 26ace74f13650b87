import { expect, type APIRequestContext } from '@playwright/test';
import { formHeaders, freshEmail, newContext, pathOf, signUp, waitForMail } from './accounts';
import { plantedFaultAdder } from '../../../src/lib/quantum/templates';

// A fresh team with one member of each role (plus a signed-in stranger and a visitor without a
// session), made over HTTP the way people do it: sign-up, invitation by mail, acceptance.

export type Actor = 'owner' | 'engineer' | 'reviewer' | 'viewer' | 'stranger' | 'anon';
export const ACTORS: Actor[] = ['owner', 'engineer', 'reviewer', 'viewer', 'stranger', 'anon'];

export type Crew = { slug: string; ctx: Record<Actor, APIRequestContext>; ids: Record<string, string>; dispose: () => Promise<void> };

export async function makeCrew(label: string): Promise<Crew> {
	const ctx = {} as Record<Actor, APIRequestContext>;
	for (const a of ACTORS) ctx[a] = await newContext();
	const emails = {} as Record<Actor, string>;
	for (const a of ACTORS) {
		if (a === 'anon') continue;
		emails[a] = freshEmail(`${label.toLowerCase().replace(/[^a-z0-9]+/g, "-")}-${a}`);
		await signUp(ctx[a], emails[a], `${label} ${a}`);
	}
	const created = await ctx.owner.post('/api/teams', { data: { name: `${label} Lab ${Date.now()}` } });
	expect(created.status()).toBe(201);
	const slug = (await created.json()).slug as string;
	for (const a of ['engineer', 'reviewer', 'viewer'] as const) {
		expect((await ctx.owner.post(`/api/teams/${slug}/invitations`, { data: { email: emails[a], role: a } })).status()).toBe(201);
		const mail = await waitForMail(emails[a], '/invite/');
		expect((await ctx[a].post(`${pathOf(mail.link)}?/accept`, { form: {}, headers: formHeaders })).status()).toBe(303);
	}
	const members = await (await ctx.owner.get(`/api/teams/${slug}/members`)).json();
	const ids: Record<string, string> = {};
	for (const m of members.members as { id: string; role: string }[]) ids[m.role] = m.id;
	return { slug, ctx, ids, dispose: async () => { for (const a of ACTORS) await ctx[a].dispose(); } };
}

/** The demo's planted-fault adder under a title of its own (so the seeded demo stays as it is). */
export function faultyAdder(title: string) {
	return { ...plantedFaultAdder(), title };
}

/** c=1, a=2 makes the planted fault show (the rotation c·a[1] → b[3] is pi/8 instead of pi/4). */
export const FAULT_INPUTS = { values: { c: '1', a: '2', b: '0' }, superposed: [] as string[] };

/** Upload a trace as the command line does (document, no summary: the server runs it). */
export async function pushTrace(c: APIRequestContext, slug: string, title: string) {
	const res = await c.post(`/api/teams/${slug}/traces`, { data: { document: faultyAdder(title), inputs: FAULT_INPUTS, label: 'from the e2e test' } });
	expect(res.status(), await res.text()).toBe(201);
	return (await res.json()) as { id: string; computedBy: string; circuit: { id: string; version: number } };
}

/** A minimal valid PNG (1×1, from the PNG specification's chunk layout), for upload tests. */
export const TINY_PNG = Buffer.from(
	'iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAYAAAAfFcSJAAAADUlEQVR42mP8z8DwHwAFBQIAX8jx0gAAAABJRU5ErkJggg==',
	'base64'
);
