// Redis settings shared by the web process (queue producer, rate limits, progress reads) and the
// check workers (BullMQ consumers). Relative imports only: the worker runs under tsx, outside
// SvelteKit, so `$lib` does not resolve there.
import { Redis, type RedisOptions } from 'ioredis';
import { config } from '../config';

/** The one queue every check job goes through: plan, shard, merge. */
export const CHECK_QUEUE = 'checks';

/** Redis keys of our own (beside BullMQ's), under the same prefix so one Redis can host several installs. */
export const redisKeys = {
	/** Set when a check is cancelled; shards read it before and between chunks of inputs. */
	cancel: (checkId: string) => `${config.checks.queuePrefix}:check:${checkId}:cancel`,
	/** Hash shard → inputs done in that shard (a retried shard overwrites its own field, never adds). */
	progress: (checkId: string) => `${config.checks.queuePrefix}:check:${checkId}:progress`
};

/** Keys of our own live a day: long after any check ends, short enough not to pile up. */
export const KEY_TTL_SECONDS = 24 * 3600;

/**
 * Options for a connection. Workers need `maxRetriesPerRequest: null` (BullMQ's blocking calls);
 * the web process wants the opposite: fail fast, so a dead Redis never holds a request.
 */
export function redisOptions(kind: 'worker' | 'web'): RedisOptions {
	return kind === 'worker'
		? { maxRetriesPerRequest: null, enableReadyCheck: true }
		: { maxRetriesPerRequest: 1, connectTimeout: 2000, enableOfflineQueue: true, retryStrategy: (n) => Math.min(n * 200, 2000) };
}

export function connectRedis(kind: 'worker' | 'web'): Redis {
	return new Redis(config.redisUrl, redisOptions(kind));
}

/** Races a Redis call against a timer, so a web request never waits on a Redis that does not answer. */
export async function withTimeout<T>(p: Promise<T>, ms: number, what: string): Promise<T> {
	let timer: ReturnType<typeof setTimeout> | undefined;
	try {
		return await Promise.race([
			p,
			new Promise<never>((_, reject) => {
				timer = setTimeout(() => reject(new Error(`${what}: no answer from Redis within ${ms} ms`)), ms);
			})
		]);
	} finally {
		clearTimeout(timer);
	}
}

let web: Redis | null = null;

/** The web process's one Redis connection (queue producer, progress reads, rate limits), made on first use. */
export function sharedWebRedis(): Redis {
	if (!web) {
		web = connectRedis('web');
		web.on('error', () => undefined); // reported by /api/health and by the calls that fail
	}
	return web;
}

export function closeSharedWebRedis(): void {
	web?.disconnect();
	web = null;
}
