import { RateLimiterMemory, RateLimiterRes } from 'rate-limiter-flexible';
import { error } from '@sveltejs/kit';

// In-process limiters (RateLimiterMemory): the app runs as one Node process, so memory is exact,
// costs no database round trip, and a restart forgiving old attempts is acceptable. With more
// than one app process, switch these to RateLimiterMySQL on the same pool.

/** Failed sign-ins: per account and per client address. Only failures count. */
const signInPerAccount = new RateLimiterMemory({ keyPrefix: 'signin-acct', points: 5, duration: 15 * 60 });
const signInPerAddress = new RateLimiterMemory({ keyPrefix: 'signin-addr', points: 50, duration: 15 * 60 });
/** Reset mails: every request counts. */
const resetPerAccount = new RateLimiterMemory({ keyPrefix: 'reset-acct', points: 3, duration: 60 * 60 });
const resetPerAddress = new RateLimiterMemory({ keyPrefix: 'reset-addr', points: 20, duration: 60 * 60 });
/** Requests with an unknown or revoked bearer token, per address. */
const badTokenPerAddress = new RateLimiterMemory({ keyPrefix: 'token-addr', points: 30, duration: 60 });

export class TooManyAttempts extends Error {
	constructor(public retryAfterSeconds: number) {
		super(`Too many attempts; try again in ${retryAfterSeconds} s.`);
	}
}

function seconds(res: RateLimiterRes | null): number {
	return Math.max(1, Math.ceil((res?.msBeforeNext ?? 1000) / 1000));
}

/** Throws TooManyAttempts when any of the keys is already over its limit (consumes nothing). */
async function ensureUnder(pairs: [RateLimiterMemory, string][]): Promise<void> {
	for (const [limiter, key] of pairs) {
		const res = await limiter.get(key);
		if (res && res.consumedPoints >= limiter.points) throw new TooManyAttempts(seconds(res));
	}
}

async function consumeAll(pairs: [RateLimiterMemory, string][]): Promise<void> {
	let blocked: number | null = null;
	for (const [limiter, key] of pairs) {
		try {
			await limiter.consume(key);
		} catch (e) {
			if (e instanceof RateLimiterRes) blocked = Math.max(blocked ?? 0, seconds(e));
			else throw e;
		}
	}
	if (blocked !== null) throw new TooManyAttempts(blocked);
}

const signInKeys = (email: string, address: string): [RateLimiterMemory, string][] => [
	[signInPerAccount, email.toLowerCase()],
	[signInPerAddress, address]
];

export const limits = {
	signIn: {
		check: (email: string, address: string) => ensureUnder(signInKeys(email, address)),
		/** Count a failure; the limit engages from the next attempt. */
		fail: (email: string, address: string) => consumeAll(signInKeys(email, address)).catch(() => undefined),
		succeed: (email: string) => signInPerAccount.delete(email.toLowerCase())
	},
	reset: {
		consume: (email: string, address: string) =>
			consumeAll([
				[resetPerAccount, email.toLowerCase()],
				[resetPerAddress, address]
			])
	},
	badToken: {
		check: (address: string) => ensureUnder([[badTokenPerAddress, address]]),
		fail: (address: string) => consumeAll([[badTokenPerAddress, address]]).catch(() => undefined)
	}
};

/** For endpoints: a 429 whose body carries retryAfter, turned into a Retry-After header. */
export function throwTooMany(e: TooManyAttempts): never {
	error(429, { message: e.message, code: 'rate_limited', retryAfter: e.retryAfterSeconds } as App.Error);
}
