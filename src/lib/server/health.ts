import type { Knex } from 'knex';

export type HealthReport = { ok: true; db: 'up' } | { ok: false; db: 'down'; reason: string };

/** Runs a real query; the report is "up" only when it returns. Bounded to `timeoutMs`. */
export async function checkDatabase(db: Knex, timeoutMs = 2000): Promise<HealthReport> {
	let timer: ReturnType<typeof setTimeout> | undefined;
	try {
		const query = db.raw('SELECT 1 AS one');
		const timeout = new Promise<never>((_, reject) => {
			timer = setTimeout(() => reject(new Error(`no answer within ${timeoutMs} ms`)), timeoutMs);
		});
		const result = (await Promise.race([query, timeout])) as [{ one: number }[]];
		if (result?.[0]?.[0]?.one !== 1) return { ok: false, db: 'down', reason: 'unexpected answer to SELECT 1' };
		return { ok: true, db: 'up' };
	} catch (e) {
		const err = e as { code?: string; message?: string };
		const reason =
			err.code === 'ECONNREFUSED'
				? 'database refused the connection (is MariaDB running?)'
				: err.code === 'ER_ACCESS_DENIED_ERROR'
					? 'database refused the credentials'
					: (err.message ?? 'unknown database error').split('\n')[0];
		return { ok: false, db: 'down', reason };
	} finally {
		clearTimeout(timer);
	}
}

/** The queue's Redis answers PING within `timeoutMs`. */
export async function checkQueue(redis: { ping(): Promise<string> }, timeoutMs = 1000): Promise<{ queue: 'up' } | { queue: 'down'; queueReason: string }> {
	let timer: ReturnType<typeof setTimeout> | undefined;
	try {
		const answer = await Promise.race([
			redis.ping(),
			new Promise<never>((_, reject) => {
				timer = setTimeout(() => reject(new Error(`no answer within ${timeoutMs} ms`)), timeoutMs);
			})
		]);
		return answer === 'PONG' ? { queue: 'up' } : { queue: 'down', queueReason: `unexpected answer to PING: ${answer}` };
	} catch (e) {
		const msg = (e as Error).message ?? 'unknown error';
		return { queue: 'down', queueReason: /ECONNREFUSED|connect/i.test(msg) ? 'Redis refused the connection (is it running? npm start starts it)' : msg.split('\n')[0] };
	} finally {
		clearTimeout(timer);
	}
}
