import { isHttpError } from '@sveltejs/kit';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { haveTestDb, openTestDb } from './test-db';
import type { Role } from '../../src/lib/permissions';

// The guard through its real database lookups (it uses the app's own pool, which npm test points
// at the throwaway database). Statuses: 401 no user, 404 not a member / other team's token, 403 role.

describe.skipIf(!haveTestDb)('requireTeamRole', () => {
	const db = haveTestDb ? openTestDb() : (null as never);
	let guard: typeof import('../../src/lib/server/guard');
	let appDb: typeof import('../../src/lib/server/db');
	let teams: typeof import('../../src/lib/server/repositories/teams');
	const people = {} as Record<Role | 'stranger', { id: string; email: string; name: string }>;
	let slug = '';
	let teamId = '';
	let otherSlug = '';

	beforeAll(async () => {
		await db.migrate.latest();
		guard = await import('../../src/lib/server/guard');
		appDb = await import('../../src/lib/server/db');
		teams = await import('../../src/lib/server/repositories/teams');
		const { insertUser } = await import('../../src/lib/server/repositories/users');
		for (const r of ['owner', 'engineer', 'reviewer', 'viewer', 'stranger'] as const) {
			people[r] = await insertUser(db, { email: `guard-${r}-${Date.now()}@integration.example`, name: r, passwordHash: 'h' });
		}
		const team = await teams.createTeam(db, `Guard ${Date.now()}`, people.owner.id);
		slug = team.slug;
		teamId = team.id;
		for (const r of ['engineer', 'reviewer', 'viewer'] as const) await teams.addMember(db, team.id, people[r].id, r);
		otherSlug = (await teams.createTeam(db, `Guard other ${Date.now()}`, people.owner.id)).slug;
	});
	afterAll(async () => {
		await db?.destroy();
		await appDb?.db.destroy();
	});

	const locals = (u: { id: string; email: string; name: string } | null, token: App.Locals['token'] = null): App.Locals => ({
		user: u,
		session: null,
		token
	});
	async function status(l: App.Locals, s: string, need: Parameters<typeof guard.requireTeamRole>[2]): Promise<number> {
		try {
			await guard.requireTeamRole(l, s, need);
			return 200;
		} catch (e) {
			if (isHttpError(e)) return e.status;
			throw e;
		}
	}

	it('answers 401, 404 and 403 as documented, by role or by action', async () => {
		const who = ['owner', 'engineer', 'reviewer', 'viewer', 'stranger'] as const;
		const row = async (need: Parameters<typeof guard.requireTeamRole>[2]) => [
			...(await Promise.all(who.map((w) => status(locals(people[w]), slug, need)))),
			await status(locals(null), slug, need)
		];
		expect(await row('members.manage')).toEqual([200, 403, 403, 403, 404, 401]);
		expect(await row('circuit.edit')).toEqual([200, 200, 403, 403, 404, 401]);
		expect(await row('report.status')).toEqual([200, 200, 200, 403, 404, 401]);
		expect(await row('trace.replay')).toEqual([200, 200, 200, 200, 404, 401]);
		expect(await row('engineer')).toEqual([200, 200, 403, 403, 404, 401]);
		expect(await status(locals(people.owner), 'no-such-team-anywhere', 'team.view')).toBe(404);
	});

	it('a token is limited to its team and to min(its role, the creator’s current role)', async () => {
		const ownerToken = locals(people.owner, { id: 't1', teamId, role: 'reviewer' });
		expect(await status(ownerToken, slug, 'report.status')).toBe(200);
		expect(await status(ownerToken, slug, 'members.manage')).toBe(403);
		expect(await status(ownerToken, otherSlug, 'team.view')).toBe(404);
		// The engineer made an engineer token, then was made a viewer: the token is a viewer now.
		await teams.changeMemberRole(db, teamId, people.engineer.id, 'viewer');
		const engToken = locals(people.engineer, { id: 't2', teamId, role: 'engineer' });
		expect(await status(engToken, slug, 'circuit.edit')).toBe(403);
		expect(await status(engToken, slug, 'circuit.view')).toBe(200);
		await teams.changeMemberRole(db, teamId, people.engineer.id, 'engineer');
		expect(await status(engToken, slug, 'circuit.edit')).toBe(200);
	});
});
