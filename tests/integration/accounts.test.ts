import { isHttpError } from '@sveltejs/kit';
import { Lucia } from 'lucia';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { haveTestDb, openTestDb } from './test-db';
import { sha256 } from '../../src/lib/server/ids';
import { dbErrorStatus, rethrowDb } from '../../src/lib/server/errors';
import { KnexLuciaAdapter } from '../../src/lib/server/lucia-knex-adapter';
import { insertUser } from '../../src/lib/server/repositories/users';
import { addMember, changeMemberRole, createTeam, listMembers, removeMember, slugify } from '../../src/lib/server/repositories/teams';
import { acceptInvitation, createInvitation, lookupInvitation } from '../../src/lib/server/repositories/invitations';
import { consumePasswordReset, createPasswordReset, findLiveReset } from '../../src/lib/server/repositories/password-resets';
import { authenticateToken, createApiToken, revokeApiToken } from '../../src/lib/server/repositories/api-tokens';

// Repository rules against the real throwaway MariaDB. The HTTP side (hooks, actions, endpoints,
// every role against every action) is in tests/e2e/access-matrix.spec.ts.

let n = 0;
const addr = (label: string) => `${label}-${Date.now().toString(36)}-${++n}@integration.example`;

async function statusOf(p: Promise<unknown>): Promise<number> {
	try {
		await p;
		return 0;
	} catch (e) {
		if (isHttpError(e)) return e.status;
		throw e;
	}
}

describe.skipIf(!haveTestDb)('accounts, teams, invitations, resets and tokens', () => {
	const db = haveTestDb ? openTestDb() : (null as never);
	const user = (label: string) => insertUser(db, { email: addr(label), name: label, passwordHash: 'not-a-real-hash' });
	beforeAll(() => db.migrate.latest());
	afterAll(() => db?.destroy());

	it('slugs come from names, and a taken slug gets a suffix', async () => {
		expect(slugify('Halvorsen Phase Lab')).toBe('halvorsen-phase-lab');
		expect(slugify('  Ångström — QFT!! ')).toBe('angstrom-qft');
		expect(slugify('∮∮')).toBe('team');
		const owner = await user('slugger');
		const name = `Slug Lab ${Date.now()}`;
		const a = await createTeam(db, name, owner.id);
		const b = await createTeam(db, name, owner.id);
		expect(a.slug).toBe(slugify(name));
		expect(b.slug).not.toBe(a.slug);
		expect(b.slug.startsWith(a.slug + '-')).toBe(true);
		expect((await listMembers(db, b.id)).map((m) => [m.user_id, m.role])).toEqual([[owner.id, 'owner']]);
	});

	it('a duplicate key maps to 409 with a plain sentence, no SQL', async () => {
		const email = addr('twice');
		await insertUser(db, { email, name: 'x', passwordHash: 'h' });
		const e = await insertUser(db, { email, name: 'y', passwordHash: 'h' }).catch((err) => err);
		expect(dbErrorStatus(e)).toEqual({ status: 409, message: 'That already exists.' });
		let thrown: unknown;
		try {
			rethrowDb(e);
		} catch (t) {
			thrown = t;
		}
		expect(isHttpError(thrown) && thrown.status).toBe(409);
		expect(JSON.stringify((thrown as { body: unknown }).body)).not.toMatch(/INSERT|users|Duplicate/i);
	});

	it('the last owner can be neither demoted nor removed; with two owners both work', async () => {
		const owner = await user('only-owner');
		const other = await user('second');
		const team = await createTeam(db, `Owners ${Date.now()}`, owner.id);
		expect(await statusOf(changeMemberRole(db, team.id, owner.id, 'engineer'))).toBe(409);
		expect(await statusOf(removeMember(db, team.id, owner.id))).toBe(409);
		await addMember(db, team.id, other.id, 'viewer');
		expect(await statusOf(changeMemberRole(db, team.id, other.id, 'owner'))).toBe(0);
		expect(await statusOf(changeMemberRole(db, team.id, owner.id, 'viewer'))).toBe(0);
		expect(await statusOf(removeMember(db, team.id, other.id))).toBe(409); // now the only owner
		expect(await statusOf(removeMember(db, team.id, owner.id))).toBe(0);
		expect(await statusOf(removeMember(db, team.id, owner.id))).toBe(404);
	});

	it('an invitation is stored hashed, works once, only for its address, and not after 7 days', async () => {
		const owner = await user('inviter');
		const team = await createTeam(db, `Invites ${Date.now()}`, owner.id);
		const invitee = await user('invitee');
		const { invitation, token } = await createInvitation(db, { teamId: team.id, email: invitee.email, role: 'reviewer', invitedBy: owner.id });
		const row = await db('invitations').where({ id: invitation.id }).first();
		expect(row.token_hash).toBe(sha256(token));
		expect(JSON.stringify(row)).not.toContain(token);
		expect(new Date(row.expires_at).getTime() - new Date(row.created_at).getTime()).toBe(7 * 24 * 3600 * 1000);

		const wrong = await user('wrong-person');
		expect(await statusOf(acceptInvitation(db, token, wrong))).toBe(403);
		const eightDays = new Date(Date.now() + 8 * 24 * 3600 * 1000);
		expect((await lookupInvitation(db, token, eightDays)).state).toBe('expired');
		expect(await statusOf(acceptInvitation(db, token, invitee, eightDays))).toBe(410);

		expect(await acceptInvitation(db, token, invitee)).toEqual({ teamSlug: team.slug });
		expect((await listMembers(db, team.id)).find((m) => m.user_id === invitee.id)?.role).toBe('reviewer');
		expect(await statusOf(acceptInvitation(db, token, invitee))).toBe(410);
		expect((await lookupInvitation(db, token)).state).toBe('used');
		expect((await lookupInvitation(db, 'not-a-token')).state).toBe('unknown');
	});

	it('two accepts racing on one invitation: exactly one wins', async () => {
		const owner = await user('racer-owner');
		const team = await createTeam(db, `Race ${Date.now()}`, owner.id);
		const invitee = await user('racer');
		const { token } = await createInvitation(db, { teamId: team.id, email: invitee.email, role: 'viewer', invitedBy: owner.id });
		const results = await Promise.all([statusOf(acceptInvitation(db, token, invitee)), statusOf(acceptInvitation(db, token, invitee))]);
		expect(results.sort()).toEqual([0, 410]);
	});

	it('a reset token is hashed, expires after an hour, works once and spends the others', async () => {
		const u = await user('resetter');
		const first = await createPasswordReset(db, u.id);
		const token = await createPasswordReset(db, u.id);
		expect(await db('password_resets').where({ token_hash: token }).first()).toBeUndefined();
		expect(await findLiveReset(db, token)).not.toBeNull();
		expect(await findLiveReset(db, token, new Date(Date.now() + 61 * 60 * 1000))).toBeNull();

		let set = 0;
		const setPassword = async () => {
			set++;
		};
		expect(await consumePasswordReset(db, token, setPassword)).toBe(u.id);
		expect(await consumePasswordReset(db, token, setPassword)).toBeNull();
		expect(await consumePasswordReset(db, first, setPassword)).toBeNull();
		expect(set).toBe(1);
	});

	it('API tokens: only the hash is kept, they authenticate until revoked, and membership removal revokes them', async () => {
		const owner = await user('token-owner');
		const eng = await user('token-eng');
		const team = await createTeam(db, `Tokens ${Date.now()}`, owner.id);
		await addMember(db, team.id, eng.id, 'engineer');
		const { id, secret } = await createApiToken(db, { teamId: team.id, userId: eng.id, name: 'ci', role: 'reviewer' });
		expect(secret).toMatch(/^orr_[a-z2-7]{32}$/);
		const row = await db('api_tokens').where({ id }).first();
		expect(row.token_hash).toBe(sha256(secret));
		expect(row.hint).toBe(secret.slice(-4));
		expect(JSON.stringify(row)).not.toContain(secret);

		const auth = await authenticateToken(db, secret);
		expect(auth?.token).toEqual({ id, teamId: team.id, role: 'reviewer' });
		expect(auth?.user.id).toBe(eng.id);
		expect((await db('api_tokens').where({ id }).first()).last_used_at).not.toBeNull();
		expect(await authenticateToken(db, 'orr_' + 'a'.repeat(32))).toBeNull();

		await revokeApiToken(db, id);
		expect(await authenticateToken(db, secret)).toBeNull();

		const second = await createApiToken(db, { teamId: team.id, userId: eng.id, name: 'ci-2', role: 'engineer' });
		await removeMember(db, team.id, eng.id);
		expect(await authenticateToken(db, second.secret)).toBeNull();
	});

	it('the Knex lucia adapter stores, validates and ends sessions', async () => {
		const lucia = new Lucia(new KnexLuciaAdapter(db), { getUserAttributes: (a) => a });
		const u = await user('sessions');
		const s1 = await lucia.createSession(u.id, {});
		const s2 = await lucia.createSession(u.id, {});
		const v = await lucia.validateSession(s1.id);
		expect(v.user?.id).toBe(u.id);
		expect((await lucia.getUserSessions(u.id)).map((s) => s.id).sort()).toEqual([s1.id, s2.id].sort());
		await lucia.invalidateSession(s1.id);
		expect((await lucia.validateSession(s1.id)).session).toBeNull();
		await lucia.invalidateUserSessions(u.id);
		expect((await lucia.validateSession(s2.id)).session).toBeNull();
		// Expired rows are not sessions.
		await db('sessions').insert({ id: 'expired-session-for-test-' + n, user_id: u.id, expires_at: new Date(Date.now() - 1000) });
		expect((await lucia.validateSession('expired-session-for-test-' + n)).session).toBeNull();
	});
});
