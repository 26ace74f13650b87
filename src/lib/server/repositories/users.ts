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
