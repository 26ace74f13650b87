import { error } from '@sveltejs/kit';
import type { Db } from '../db';
import { newId } from '../ids';
import { isDuplicateKey } from '../errors';
import type { Role } from '$lib/permissions';
import type { Knex } from 'knex';

export type TeamRow = { id: string; slug: string; name: string; created_by: string | null; created_at: Date };
export type MemberRow = { user_id: string; email: string; name: string; role: Role; joined_at: Date };
export type MyTeam = { id: string; slug: string; name: string; role: Role };

/** "Halvorsen Phase Lab" → "halvorsen-phase-lab"; accents dropped; never empty. */
export function slugify(name: string): string {
	const s = name
		.normalize('NFKD')
		.replace(/[\u0300-\u036f]/g, '')
		.toLowerCase()
		.replace(/[^a-z0-9]+/g, '-')
		.replace(/^-+|-+$/g, '')
		.slice(0, 48)
		.replace(/-+$/g, '');
	return s || 'team';
}

export async function findTeamBySlug(db: Db, slug: string): Promise<TeamRow | undefined> {
	return db<TeamRow>('teams').where({ slug }).first();
}

export async function findMembership(db: Db, teamId: string, userId: string): Promise<{ role: Role } | undefined> {
	return db('memberships').where({ team_id: teamId, user_id: userId }).first('role');
}

export async function listMyTeams(db: Db, userId: string): Promise<MyTeam[]> {
	return db('memberships as m')
		.join('teams as t', 't.id', 'm.team_id')
		.where('m.user_id', userId)
		.orderBy('t.name')
		.select('t.id', 't.slug', 't.name', 'm.role');
}

export async function listMembers(db: Db, teamId: string): Promise<MemberRow[]> {
	return db('memberships as m')
		.join('users as u', 'u.id', 'm.user_id')
		.where('m.team_id', teamId)
		.orderByRaw("FIELD(m.role, 'owner', 'engineer', 'reviewer', 'viewer')")
		.orderBy('u.name')
		.select('m.user_id', 'u.email', 'u.name', 'm.role', 'm.created_at as joined_at');
}

export async function countMembers(db: Db, teamId: string): Promise<number> {
	const row = await db('memberships').where({ team_id: teamId }).count<{ n: number }[]>({ n: '*' }).first();
	return Number(row?.n ?? 0);
}

/**
 * Create a team with `ownerId` as its owner. The slug comes from the name; when it is taken a
 * short suffix is added (the unique index decides, so two requests racing cannot share a slug).
 */
export async function createTeam(db: Knex, name: string, ownerId: string): Promise<TeamRow> {
	const base = slugify(name);
	for (let attempt = 0; attempt < 6; attempt++) {
		const slug = attempt === 0 ? base : `${base}-${Math.random().toString(36).slice(2, 6)}`;
		const now = new Date();
		const team: TeamRow = { id: newId(), slug, name, created_by: ownerId, created_at: now };
		try {
			await db.transaction(async (trx) => {
				await trx('teams').insert(team);
				await trx('memberships').insert({ team_id: team.id, user_id: ownerId, role: 'owner', created_at: now, updated_at: now });
			});
			return team;
		} catch (e) {
			if (!isDuplicateKey(e)) throw e;
		}
	}
	error(409, { message: 'Could not find a free address for that team name; try another name.', code: 'conflict' });
}

/** Adds a member; an existing membership is kept as it is. */
export async function addMember(db: Db, teamId: string, userId: string, role: Role): Promise<void> {
	const now = new Date();
	await db('memberships')
		.insert({ team_id: teamId, user_id: userId, role, created_at: now, updated_at: now })
		.onConflict(['team_id', 'user_id'])
		.ignore();
}

async function lockedOwnerCount(trx: Knex.Transaction, teamId: string): Promise<number> {
	const rows = await trx('memberships').where({ team_id: teamId, role: 'owner' }).forUpdate().select('user_id');
	return rows.length;
}

const LAST_OWNER = 'A team needs at least one owner. Make someone else an owner first.';

/** Change a member's role; refuses to demote the last owner (409). */
export async function changeMemberRole(db: Knex, teamId: string, userId: string, role: Role): Promise<void> {
	await db.transaction(async (trx) => {
		const current = await trx('memberships').where({ team_id: teamId, user_id: userId }).forUpdate().first('role');
		if (!current) error(404, { message: 'That person is not a member of this team.', code: 'not_found' });
		if (current.role === 'owner' && role !== 'owner' && (await lockedOwnerCount(trx, teamId)) <= 1) {
			error(409, { message: LAST_OWNER, code: 'conflict' });
		}
		await trx('memberships').where({ team_id: teamId, user_id: userId }).update({ role, updated_at: new Date() });
	});
}

/** Remove a member (or let one leave); the last owner stays (409). Their tokens for the team end too. */
export async function removeMember(db: Knex, teamId: string, userId: string): Promise<void> {
	await db.transaction(async (trx) => {
		const current = await trx('memberships').where({ team_id: teamId, user_id: userId }).forUpdate().first('role');
		if (!current) error(404, { message: 'That person is not a member of this team.', code: 'not_found' });
		if (current.role === 'owner' && (await lockedOwnerCount(trx, teamId)) <= 1) {
			error(409, { message: LAST_OWNER, code: 'conflict' });
		}
		await trx('memberships').where({ team_id: teamId, user_id: userId }).delete();
		await trx('api_tokens').where({ team_id: teamId, user_id: userId }).whereNull('revoked_at').update({ revoked_at: new Date() });
	});
}
