// Queueing, cancelling and reading checks: the producer side, used by the web process (and by the
// worker's start-up backfill). Adding a job is one Redis round trip raced against a timer: a save
// never waits on the checker, and a dead Redis turns into a check marked "could not be queued".
import type { Knex } from 'knex';
import { Queue } from 'bullmq';
import type { Redis } from 'ioredis';
import { config } from '../config';
import { CHECK_QUEUE, closeSharedWebRedis, KEY_TTL_SECONDS, redisKeys, sharedWebRedis, withTimeout } from './redis';
import { cancelCheck, countShards, createCheck, finishCheck, isFinished, type CheckReason, type CheckRow } from './store';
import { jobPriority } from './plan';
import { rateAndEstimate } from './plan';

let shared: { redis: Redis; queue: Queue } | null = null;

/** This process's producer connection and queue (made on first use). */
export function checkQueue(): { redis: Redis; queue: Queue } {
	if (!shared) {
		const redis = sharedWebRedis();
		shared = { redis, queue: new Queue(CHECK_QUEUE, { connection: redis, prefix: config.checks.queuePrefix }) };
	}
	return shared;
}

export async function closeCheckQueue(): Promise<void> {
	if (!shared) return;
	const s = shared;
	shared = null;
	await s.queue.close();
	closeSharedWebRedis();
}

/** Milliseconds a web request waits for Redis to take a job. */
export const ENQUEUE_TIMEOUT_MS = 2000;

/** Queue a check of `version` of a circuit. Null when the version does not exist. */
export async function enqueueCheck(
	db: Knex,
	p: { teamId: string; circuitId: string; version: number; userId: string | null; reason: CheckReason },
	queue: Queue = checkQueue().queue
): Promise<CheckRow | null> {
	const row = await createCheck(db, p);
	if (!row) return null;
	try {
		await withTimeout(queue.add('plan', { checkId: row.id }, { jobId: `${row.id}-plan`, ...jobPriority(p.reason), attempts: 3, backoff: { type: 'exponential', delay: 1000 }, removeOnComplete: 1000, removeOnFail: 1000 }), ENQUEUE_TIMEOUT_MS, 'queueing the check');
	} catch (e) {
		console.error(`check ${row.id}: ${(e as Error).message}`);
		await finishCheck(db, row.id, {
			status: 'error',
			method: null,
			engine: null,
			proofStatus: null,
			cases: 0,
			failed: 0,
			exhaustive: false,
			worstProbability: null,
			message: 'the check could not be queued (the queue did not answer); the version is saved: ask for a check again later',
			result: null,
			host: 'web'
		});
	}
	return row;
}

/** Queue a check when the document has specs (a version without specs has nothing to check). */
export async function enqueueIfSpecified(
	db: Knex,
	doc: { specs?: string[] },
	p: { teamId: string; circuitId: string; version: number; userId: string | null; reason: CheckReason }
): Promise<CheckRow | null> {
	if (!doc.specs?.length) return null;
	return enqueueCheck(db, p);
}

/** Cancel: the row first (so no verdict can land), then the flag every shard reads between chunks. */
export async function requestCancel(db: Knex, checkId: string, userId: string, redis: Redis = checkQueue().redis): Promise<boolean> {
	const done = await cancelCheck(db, checkId, userId);
	if (done) await withTimeout(redis.set(redisKeys.cancel(checkId), userId, 'EX', KEY_TTL_SECONDS), ENQUEUE_TIMEOUT_MS, 'cancelling').catch(() => undefined);
	return done;
}

export interface CheckProgress {
	shardsDone: number;
	shardsTotal: number;
	inputsDone: number;
	inputsTotal: number;
	inputsPerSecond: number | null;
	etaSeconds: number | null;
}

/** Shards done from the database (authoritative), inputs done from the workers' Redis counters. */
export async function readProgress(db: Knex, row: CheckRow, redis: Redis = checkQueue().redis): Promise<CheckProgress> {
	const { shards, cases } = await countShards(db, row.id);
	let inputsDone = cases;
	if (!isFinished(row.status)) {
		const parts = await withTimeout(redis.hgetall(redisKeys.progress(row.id)), 1000, 'progress').catch(() => ({}) as Record<string, string>);
		const live = Object.values(parts).reduce((s, v) => s + Number(v), 0);
		inputsDone = Math.max(inputsDone, Math.min(row.inputs_total, live));
	} else if (row.status === 'pass' || row.status === 'fail') inputsDone = row.inputs_total;
	const elapsed = row.started_at ? (row.finished_at ?? new Date()).getTime() - row.started_at.getTime() : 0;
	return { shardsDone: shards, shardsTotal: row.shards_total, inputsDone, inputsTotal: row.inputs_total, ...rateAndEstimate(inputsDone, row.inputs_total, elapsed) };
}
