import type { Db } from '../db';
import { newId, newSecret, sha256 } from '../ids';
import type { Role } from '$lib/permissions';

export const TOKEN_PREFIX = 'orr_';
/** Tokens made before the rename carry this prefix; they stay valid (only their sha-256 is stored). */
const LEGACY_TOKEN_PREFIX = 'pw_';

export type ApiTokenRow = {
	id: string;
	team_id: string;
	user_id: string;
	name: string;
	role: Role;
	token_hash: string;
	hint: string;
	last_used_at: Date | null;
	revoked_at: Date | null;
	created_at: Date;
};

export type TokenListItem = Pick<ApiTokenRow, 'id' | 'name' | 'role' | 'hint' | 'last_used_at' | 'created_at' | 'user_id'> & { creator_name: string };

/** Returns the secret once (`orr_…`); the table keeps its sha-256 and the last four characters. */
export async function createApiToken(
	db: Db,
	t: { teamId: string; userId: string; name: string; role: Role },
	now = new Date()
): Promise<{ id: string; secret: string }> {
	const secret = TOKEN_PREFIX + newSecret();
	const id = newId();
	await db('api_tokens').insert({
		id,
		team_id: t.teamId,
		user_id: t.userId,
		name: t.name,
		role: t.role,
		token_hash: sha256(secret),
		hint: secret.slice(-4),
		last_used_at: null,
		revoked_at: null,
		created_at: now
	});
	return { id, secret };
}

export async function listActiveTokens(db: Db, teamId: string, onlyUserId?: string): Promise<TokenListItem[]> {
	const q = db('api_tokens as k')
		.join('users as u', 'u.id', 'k.user_id')
		.where('k.team_id', teamId)
		.whereNull('k.revoked_at')
		.orderBy('k.created_at', 'desc')
		.select('k.id', 'k.name', 'k.role', 'k.hint', 'k.last_used_at', 'k.created_at', 'k.user_id', 'u.name as creator_name');
	if (onlyUserId) q.where('k.user_id', onlyUserId);
	return q;
}

export async function findActiveToken(db: Db, teamId: string, tokenId: string): Promise<ApiTokenRow | undefined> {
	return db<ApiTokenRow>('api_tokens').where({ id: tokenId, team_id: teamId }).whereNull('revoked_at').first();
}

export async function revokeApiToken(db: Db, tokenId: string, now = new Date()): Promise<void> {
	await db('api_tokens').where({ id: tokenId }).whereNull('revoked_at').update({ revoked_at: now });
}

/**
 * Resolve a bearer secret. The token acts as its creator, limited to its team and to its own
 * role (the guard lowers that further to the creator's current role).
 */
export async function authenticateToken(
	db: Db,
	secret: string,
	now = new Date()
): Promise<{ token: { id: string; teamId: string; role: Role }; user: { id: string; email: string; name: string } } | null> {
	if (!(secret.startsWith(TOKEN_PREFIX) || secret.startsWith(LEGACY_TOKEN_PREFIX)) || secret.length > 100) return null;
	const row = await db('api_tokens as k')
		.join('users as u', 'u.id', 'k.user_id')
		.where('k.token_hash', sha256(secret))
		.whereNull('k.revoked_at')
		.first('k.id', 'k.team_id', 'k.role', 'k.last_used_at', 'u.id as user_id', 'u.email', 'u.name');
	if (!row) return null;
	// Write last-used at most once a minute per token.
	if (!row.last_used_at || now.getTime() - new Date(row.last_used_at).getTime() > 60_000) {
		await db('api_tokens').where({ id: row.id }).update({ last_used_at: now });
	}
	return { token: { id: row.id, teamId: row.team_id, role: row.role }, user: { id: row.user_id, email: row.email, name: row.name } };
}
