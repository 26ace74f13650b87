import { Lucia, TimeSpan } from 'lucia';
import { hash, verify } from '@node-rs/argon2';
import type { Cookies } from '@sveltejs/kit';
import { config } from './config';
import { db } from './db';
import { KnexLuciaAdapter } from './lucia-knex-adapter';

export const lucia = new Lucia(new KnexLuciaAdapter(db), {
	sessionExpiresIn: new TimeSpan(30, 'd'),
	sessionCookie: {
		name: 'orrery_session',
		// lucia always sets HttpOnly; Secure follows the origin so local http still works.
		attributes: { sameSite: 'lax', secure: config.origin.startsWith('https:') }
	},
	getUserAttributes: (a) => ({ email: a.email, name: a.name })
});

declare module 'lucia' {
	interface Register {
		Lucia: typeof lucia;
		DatabaseUserAttributes: { email: string; name: string };
		UserId: string;
	}
}

/**
 * argon2id, m = 19 MiB, t = 2, p = 1: the @node-rs/argon2 defaults, spelled out so a library
 * update cannot weaken them silently (the OWASP password storage cheat sheet's first option).
 */
const ARGON2 = { algorithm: 2 /* Argon2id */, memoryCost: 19456, timeCost: 2, parallelism: 1 } as const;

export function hashPassword(password: string): Promise<string> {
	return hash(password, ARGON2);
}

export async function verifyPassword(passwordHash: string, password: string): Promise<boolean> {
	try {
		return await verify(passwordHash, password);
	} catch {
		return false;
	}
}

/**
 * A hash to verify against when the account does not exist, so a wrong address costs the same
 * time as a wrong password and timing tells nothing.
 */
let dummyHash: Promise<string> | null = null;
export function verifyAgainstDummy(password: string): Promise<boolean> {
	dummyHash ??= hash('orrery-no-such-account');
	return dummyHash.then((h) => verifyPassword(h, password)).then(() => false);
}

export async function startSession(cookies: Cookies, userId: string): Promise<void> {
	const session = await lucia.createSession(userId, {});
	const c = lucia.createSessionCookie(session.id);
	cookies.set(c.name, c.value, { path: '/', ...c.attributes });
}

export async function endSession(cookies: Cookies, sessionId: string | undefined): Promise<void> {
	if (sessionId) await lucia.invalidateSession(sessionId);
	const c = lucia.createBlankSessionCookie();
	cookies.set(c.name, c.value, { path: '/', ...c.attributes });
}
