import type { Db } from '../db';
import { newId } from '../ids';

export type UserRow = { id: string; email: string; name: string; password_hash: string; created_at: Date };
export type PublicUser = { id: string; email: string; name: string };

export function toPublicUser(u: Pick<UserRow, 'id' | 'email' | 'name'>): PublicUser {
	return { id: u.id, email: u.email, name: u.name };
}

export async function findUserByEmail(db: Db, email: string): Promise<UserRow | undefined> {
	return db<UserRow>('users').where({ email: email.toLowerCase() }).first();
}

export async function findUserById(db: Db, id: string): Promise<UserRow | undefined> {
	return db<UserRow>('users').where({ id }).first();
}

/** Throws the database's duplicate-key error when the address is taken (callers map it to 409). */
export async function insertUser(db: Db, u: { email: string; name: string; passwordHash: string }): Promise<PublicUser> {
	const now = new Date();
	const row = { id: newId(), email: u.email.toLowerCase(), name: u.name, password_hash: u.passwordHash, created_at: now, updated_at: now };
	await db('users').insert(row);
	return toPublicUser(row);
}

export async function updatePasswordHash(db: Db, userId: string, passwordHash: string): Promise<void> {
	await db('users').where({ id: userId }).update({ password_hash: passwordHash, updated_at: new Date() });
}

export async function updateUserName(db: Db, userId: string, name: string): Promise<void> {
	await db('users').where({ id: userId }).update({ name, updated_at: new Date() });
}

export async function setReportMail(db: Db, userId: string, on: boolean): Promise<void> {
	await db('users').where({ id: userId }).update({ mail_report_events: on, updated_at: new Date() });
}

export async function getReportMail(db: Db, userId: string): Promise<boolean> {
	const r = await db('users').where({ id: userId }).first('mail_report_events');
	return Boolean(r?.mail_report_events);
}

/** The user's unexpired sessions, newest first; `current` marks the one asking. Session ids are secrets and never leave the server. */
export async function listSessions(db: Db, userId: string, currentId: string | null, now = new Date()): Promise<{ current: boolean; createdAt: string; expiresAt: string }[]> {
	const rows = await db('sessions').where({ user_id: userId }).where('expires_at', '>', now).orderBy('created_at', 'desc').select('id', 'created_at', 'expires_at');
	return rows.map((r: { id: string; created_at: Date; expires_at: Date }) => ({ current: r.id === currentId, createdAt: new Date(r.created_at).toISOString(), expiresAt: new Date(r.expires_at).toISOString() }));
}

/** End every session of the user except `keepId`; returns how many ended. */
export async function endOtherSessions(db: Db, userId: string, keepId: string | null): Promise<number> {
	const q = db('sessions').where({ user_id: userId });
	if (keepId) q.whereNot({ id: keepId });
	return q.delete();
}

/** Teams where this user is the only owner (an account cannot be deleted while there are any). */
export async function teamsOnlyOwnedBy(db: Db, userId: string): Promise<{ slug: string; name: string }[]> {
	return db('memberships as m')
		.join('teams as t', 't.id', 'm.team_id')
		.where({ 'm.user_id': userId, 'm.role': 'owner' })
		.whereNotExists(db('memberships as o').whereRaw('o.team_id = m.team_id').where('o.role', 'owner').whereNot('o.user_id', userId).select(db.raw('1')))
		.orderBy('t.name')
		.select('t.slug', 't.name');
}

export class LastOwnerError extends Error {
	constructor(readonly teams: { slug: string; name: string }[]) {
		super(`You are the only owner of ${teams.map((t) => `"${t.name}"`).join(', ')}. Make someone else an owner there (or delete the team) first.`);
	}
}

/**
 * Delete the account: memberships, sessions, tokens, resets go with it (foreign keys cascade);
 * what the person made (circuits, traces, reports, comments) stays, with the author cleared.
 * Refused while they are the only owner of a team; the owner rows are locked while checking so
 * a concurrent demotion cannot leave a team without an owner.
 */
export async function deleteUser(db: import('knex').Knex, userId: string): Promise<void> {
	await db.transaction(async (trx) => {
		const teamIds = (await trx('memberships').where({ user_id: userId, role: 'owner' }).select('team_id')).map((r: { team_id: string }) => r.team_id);
		if (teamIds.length) await trx('memberships').whereIn('team_id', teamIds).where('role', 'owner').forUpdate().select('user_id');
		const alone = await teamsOnlyOwnedBy(trx, userId);
		if (alone.length) throw new LastOwnerError(alone);
		await trx('audit_log').insert({ actor_id: userId, team_id: null, action: 'user.delete', subject_type: 'user', subject_id: userId });
		await trx('users').where({ id: userId }).delete();
	});
}
