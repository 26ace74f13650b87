import { error } from '@sveltejs/kit';
import type { Knex } from 'knex';
import type { Db } from '../db';
import { newId, newSecret, sha256 } from '../ids';
import type { Role } from '$lib/permissions';
import { addMember } from './teams';

export const INVITATION_TTL_MS = 7 * 24 * 3600 * 1000;

export type InvitationRow = {
	id: string;
	team_id: string;
	email: string;
	role: Role;
	token_hash: string;
	invited_by: string | null;
	expires_at: Date;
	accepted_at: Date | null;
	accepted_by: string | null;
	revoked_at: Date | null;
	superseded_at?: Date | null;
	created_at: Date;
};

export type PendingInvitation = Pick<InvitationRow, 'id' | 'email' | 'role' | 'expires_at' | 'created_at'> & { invited_by_name: string | null };

/** Creates an invitation and returns the plain token (for the e-mail only; the table keeps its hash). */
export async function createInvitation(
	db: Db,
	inv: { teamId: string; email: string; role: Role; invitedBy: string },
	now = new Date()
): Promise<{ invitation: InvitationRow; token: string }> {
	const token = newSecret();
	const invitation: InvitationRow = {
		id: newId(),
		team_id: inv.teamId,
		email: inv.email.toLowerCase(),
		role: inv.role,
		token_hash: sha256(token),
		invited_by: inv.invitedBy,
		expires_at: new Date(now.getTime() + INVITATION_TTL_MS),
		accepted_at: null,
		accepted_by: null,
		revoked_at: null,
		created_at: now
	};
	await db('invitations').insert(invitation);
	return { invitation, token };
}

export async function listPendingInvitations(db: Db, teamId: string, now = new Date()): Promise<PendingInvitation[]> {
	return db('invitations as i')
		.leftJoin('users as u', 'u.id', 'i.invited_by')
		.where('i.team_id', teamId)
		.whereNull('i.accepted_at')
		.whereNull('i.revoked_at')
		.whereNull('i.superseded_at')
		.where('i.expires_at', '>', now)
		.orderBy('i.created_at', 'desc')
		.select('i.id', 'i.email', 'i.role', 'i.expires_at', 'i.created_at', 'u.name as invited_by_name');
}

export async function revokeInvitation(db: Db, teamId: string, invitationId: string): Promise<boolean> {
	const n = await db('invitations')
		.where({ id: invitationId, team_id: teamId })
		.whereNull('accepted_at')
		.whereNull('revoked_at')
		.whereNull('superseded_at')
		.update({ revoked_at: new Date() });
	return n > 0;
}

export type InvitationView = { id: string; email: string; role: Role; teamId: string; teamSlug: string; teamName: string; invitedByName: string | null };
export type InvitationLookup = { state: 'ok'; invitation: InvitationView } | { state: 'expired' | 'used' | 'revoked' | 'superseded' | 'member' | 'unknown' };

type StateRow = { accepted_at: Date | null; revoked_at: Date | null; superseded_at?: Date | null; expires_at: Date; already_member?: unknown };

/** Why a link no longer works, or 'ok'. A pending link for someone who joined by another one is spent too. */
function stateOf(row: StateRow | undefined, now: Date): InvitationLookup['state'] {
	if (!row) return 'unknown';
	if (row.accepted_at) return 'used';
	if (row.superseded_at) return 'superseded';
	if (row.revoked_at) return 'revoked';
	if (row.already_member) return 'member';
	if (new Date(row.expires_at).getTime() <= now.getTime()) return 'expired';
	return 'ok';
}

/** Is `email` (lowercase) a member of the team? A subquery for the lookups below. */
const memberOf = (db: Db, teamColumn: string, emailColumn: string) =>
	db('memberships as mm').join('users as mu', 'mu.id', 'mm.user_id').whereRaw('mm.team_id = ??', [teamColumn]).whereRaw('mu.email = ??', [emailColumn]).select(db.raw('1')).limit(1);

export type PendingDuplicate = { id: string; created_at: Date; expires_at: Date };

/** The pending invitation of `email` to the team, if there is one. */
export async function findPendingInvitation(db: Db, teamId: string, email: string, now = new Date()): Promise<PendingDuplicate | undefined> {
	return db('invitations')
		.where({ team_id: teamId, email: email.toLowerCase() })
		.whereNull('accepted_at')
		.whereNull('revoked_at')
		.whereNull('superseded_at')
		.where('expires_at', '>', now)
		.first('id', 'created_at', 'expires_at');
}

/**
 * "Send again": the pending invitation is superseded by a fresh one (new link, new seven days),
 * so there is still exactly one pending row and the old link says it was replaced.
 */
export async function renewInvitation(db: Knex, teamId: string, invitationId: string, invitedBy: string, now = new Date()): Promise<{ invitation: InvitationRow; token: string } | null> {
	return db.transaction(async (trx) => {
		const row = await trx<InvitationRow>('invitations').where({ id: invitationId, team_id: teamId }).forUpdate().first();
		if (!row || row.accepted_at || row.revoked_at || row.superseded_at || new Date(row.expires_at) <= now) return null;
		await trx('invitations').where({ id: row.id }).update({ superseded_at: now });
		return createInvitation(trx, { teamId, email: row.email, role: row.role, invitedBy }, now);
	});
}

/** What a token holder may see about an invitation before accepting it. */
export async function lookupInvitation(db: Db, token: string, now = new Date()): Promise<InvitationLookup> {
	const row = await db('invitations as i')
		.join('teams as t', 't.id', 'i.team_id')
		.leftJoin('users as u', 'u.id', 'i.invited_by')
		.where('i.token_hash', sha256(token))
		.first('i.*', 't.slug as team_slug', 't.name as team_name', 'u.name as invited_by_name', db.raw('exists(?) as already_member', [memberOf(db, 'i.team_id', 'i.email')]));
	const state = stateOf(row, now);
	if (state !== 'ok') return { state };
	return {
		state: 'ok',
		invitation: { id: row.id, email: row.email, role: row.role, teamId: row.team_id, teamSlug: row.team_slug, teamName: row.team_name, invitedByName: row.invited_by_name }
	};
}

const GONE: Record<string, string> = {
	unknown: 'This invitation link is not valid.',
	used: 'This invitation has already been used. It works once, and whoever it was for has joined the team.',
	superseded: 'This invitation was replaced by a newer one sent to the same address. Use the link in the latest mail.',
	member: 'You are already a member of this team (you joined with another invitation), so this link is no longer needed.',
	revoked: 'This invitation was withdrawn by the team.',
	expired: 'This invitation has expired. Ask the team for a new one.'
};

export function invitationProblem(state: Exclude<InvitationLookup['state'], 'ok'>): string {
	return GONE[state];
}

/**
 * Accept in one transaction with the row locked, so a link works exactly once. The account's
 * address must be the invited one. An existing member keeps their role.
 */
export async function acceptInvitation(
	db: Knex,
	token: string,
	user: { id: string; email: string },
	now = new Date()
): Promise<{ teamSlug: string }> {
	return db.transaction(async (trx) => {
		const row = await trx<InvitationRow>('invitations').where({ token_hash: sha256(token) }).forUpdate().first();
		const joined = row ? Boolean(await trx('memberships as m').join('users as u', 'u.id', 'm.user_id').where({ 'm.team_id': row.team_id, 'u.email': row.email }).first('m.user_id')) : false;
		const state = stateOf(row ? { ...row, already_member: joined } : undefined, now);
		if (!row || state !== 'ok') error(410, { message: invitationProblem(state as 'unknown'), code: 'gone' });
		if (row.email !== user.email.toLowerCase()) {
			error(403, { message: `This invitation was sent to ${row.email}. Sign in with that address to accept it.`, code: 'forbidden' });
		}
		await addMember(trx, row.team_id, user.id, row.role);
		await trx('invitations').where({ id: row.id }).update({ accepted_at: now, accepted_by: user.id });
		const team = await trx('teams').where({ id: row.team_id }).first('slug');
		return { teamSlug: team.slug as string };
	});
}
