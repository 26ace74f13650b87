import { RateLimiterMemory, RateLimiterRedis, RateLimiterRes } from 'rate-limiter-flexible';
import { error } from '@sveltejs/kit';
import { config } from './config';
import { sharedWebRedis } from './checks/redis';

// Shared limiters (RateLimiterRedis on the same Redis as the check queue): every app process
// counts in one place, so running several processes does not multiply any limit. Should Redis
// not answer, each limiter falls back to an in-process count (its insurance limiter) rather than
// failing the request: limits then hold per process until Redis is back.
type Limiter = RateLimiterRedis;
function shared(name: string, points: number, duration: number): Limiter {
	return new RateLimiterRedis({
		storeClient: sharedWebRedis(),
		keyPrefix: `${config.checks.queuePrefix}:rl:${name}`,
		points,
		duration,
		rejectIfRedisNotReady: true,
		insuranceLimiter: new RateLimiterMemory({ keyPrefix: `local-${name}`, points, duration })
	});
}

/** Failed sign-ins: per account and per client address. Only failures count. */
const signInPerAccount = shared('signin-acct', 5, 15 * 60);
const signInPerAddress = shared('signin-addr', 50, 15 * 60);
/** Reset mails: every request counts. */
const resetPerAccount = shared('reset-acct', 3, 60 * 60);
const resetPerAddress = shared('reset-addr', 20, 60 * 60);
/** Requests with an unknown or revoked bearer token, per address. */
const badTokenPerAddress = shared('token-addr', 30, 60);

export class TooManyAttempts extends Error {
	constructor(public retryAfterSeconds: number) {
		super(`Too many attempts; try again in ${retryAfterSeconds} s.`);
	}
}

function seconds(res: RateLimiterRes | null): number {
	return Math.max(1, Math.ceil((res?.msBeforeNext ?? 1000) / 1000));
}

/** Throws TooManyAttempts when any of the keys is already over its limit (consumes nothing). */
async function ensureUnder(pairs: [Limiter, string][]): Promise<void> {
	for (const [limiter, key] of pairs) {
		const res = await limiter.get(key);
		if (res && res.consumedPoints >= limiter.points) throw new TooManyAttempts(seconds(res));
	}
}

async function consumeAll(pairs: [Limiter, string][]): Promise<void> {
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

const signInKeys = (email: string, address: string): [Limiter, string][] => [
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
		/** Count a token proven invalid; throws TooManyAttempts once the address is over its limit. */
		reject: (address: string) => consumeAll([[badTokenPerAddress, address]])
	}
};

/** For endpoints: a 429 whose body carries retryAfter, turned into a Retry-After header. */
export function throwTooMany(e: TooManyAttempts): never {
	error(429, { message: e.message, code: 'rate_limited', retryAfter: e.retryAfterSeconds } as App.Error);
}
