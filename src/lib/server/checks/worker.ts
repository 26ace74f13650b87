// A check worker process: one BullMQ Worker on the check queue, stalled-job handling on, and a
// start-up backfill that queues a check for every latest version with specs and no check yet (the
// demo seeds, or versions saved while Redis was down). Run it with `npm run worker`; run as many as
// you like, on any machine that reaches the same MariaDB and Redis.
import { hostname } from 'node:os';
import type { Knex } from 'knex';
import { FlowProducer, Worker, type Job } from 'bullmq';
import { config } from '../config';
import { CHECK_QUEUE, connectRedis } from './redis';
import { processCheckJob, type CheckJobData, type ProcessorDeps } from './processor';
import { enqueueCheck } from './enqueue';
import { finishCheck } from './store';

export interface CheckWorker {
	worker: Worker<CheckJobData>;
	close(): Promise<void>;
}

export function startCheckWorker(db: Knex, opts: { concurrency?: number } = {}): CheckWorker {
	const redis = connectRedis('worker');
	const flow = new FlowProducer({ connection: connectRedis('worker'), prefix: config.checks.queuePrefix });
	const host = `${hostname()} (pid ${process.pid})`;
	const deps: ProcessorDeps = { db, redis, flow, host, settings: config.checks, queuePrefix: config.checks.queuePrefix };
	const lock = config.checks.lockMs;
	const worker = new Worker<CheckJobData>(CHECK_QUEUE, (job: Job<CheckJobData>, token?: string) => processCheckJob(job, token, deps), {
		connection: connectRedis('worker'),
		prefix: config.checks.queuePrefix,
		concurrency: opts.concurrency ?? config.checks.workerConcurrency,
		// A worker that dies (kill -9, lost machine) stops renewing its lock; after about `lock` ms
		// another worker finds the job stalled and runs it again. Shard rows are keyed by shard, so a
		// second run never counts twice.
		lockDuration: lock,
		stalledInterval: Math.max(1000, Math.floor(lock / 2)),
		maxStalledCount: 3
	});
	worker.on('failed', (job, err) => {
		if (!job) return;
		const final = job.attemptsMade >= (job.opts.attempts ?? 1) || err.name === 'UnrecoverableError';
		if (final) void finishCheck(db, job.data.checkId, { status: 'error', method: null, engine: null, proofStatus: null, cases: 0, failed: 0, exhaustive: false, worstProbability: null, message: `the check failed on the server: ${err.message}`, result: null, host }).catch(() => undefined);
	});
	worker.on('error', (e) => console.error(`check worker: ${e.message}`));
	return {
		worker,
		async close() {
			await worker.close();
			await flow.close();
			redis.disconnect();
		}
	};
}

/** Queue a check for each circuit whose latest version has specs and has never been checked. */
export async function backfillChecks(db: Knex): Promise<number> {
	const rows = await db('circuits as c')
		.join('circuit_versions as v', function () {
			this.on('v.circuit_id', 'c.id').andOn('v.version', 'c.latest_version');
		})
		.whereNotExists(function () {
			this.select(db.raw('1')).from('checks as k').whereRaw('k.circuit_id = c.id and k.version = c.latest_version');
		})
		.select('c.id', 'c.team_id', 'c.latest_version', 'v.document');
	let n = 0;
	for (const r of rows) {
		const doc = typeof r.document === 'string' ? JSON.parse(r.document) : r.document;
		if (!doc?.specs?.length) continue;
		if (await enqueueCheck(db, { teamId: r.team_id, circuitId: r.id, version: r.latest_version, userId: null, reason: 'seed' })) n++;
	}
	return n;
}
