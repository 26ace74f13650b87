import type { Knex } from 'knex';
import type { Db } from '../db';
import { newId, newSecret, sha256 } from '../ids';

export const RESET_TTL_MS = 3600 * 1000;

/** Returns the plain token for the e-mail; only its sha-256 is stored. */
export async function createPasswordReset(db: Db, userId: string, now = new Date()): Promise<string> {
	const token = newSecret();
	await db('password_resets').insert({
		id: newId(),
		user_id: userId,
		token_hash: sha256(token),
		expires_at: new Date(now.getTime() + RESET_TTL_MS),
		used_at: null,
		created_at: now
	});
	return token;
}

/** The user a live reset token belongs to, or null (unknown, used or expired). */
export async function findLiveReset(db: Db, token: string, now = new Date()): Promise<{ id: string; user_id: string } | null> {
	const row = await db('password_resets')
		.where({ token_hash: sha256(token) })
		.whereNull('used_at')
		.where('expires_at', '>', now)
		.first('id', 'user_id');
	return row ?? null;
}

/**
 * Spend the token and set the password in one transaction (row locked, so a second use finds
 * it spent). Every other open reset of that user is spent too. Returns the user id, or null.
 */
export async function consumePasswordReset(
	db: Knex,
	token: string,
	setPassword: (trx: Knex.Transaction, userId: string) => Promise<void>,
	now = new Date()
): Promise<string | null> {
	return db.transaction(async (trx) => {
		const row = await trx('password_resets')
			.where({ token_hash: sha256(token) })
			.whereNull('used_at')
			.where('expires_at', '>', now)
			.forUpdate()
			.first('id', 'user_id');
		if (!row) return null;
		await trx('password_resets').where({ user_id: row.user_id }).whereNull('used_at').update({ used_at: now });
		await setPassword(trx, row.user_id);
		return row.user_id as string;
	});
}
