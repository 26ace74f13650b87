import { spawn, type ChildProcess } from 'node:child_process';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { Queue, Worker } from 'bullmq';
import { Redis } from 'ioredis';
import type { Knex } from 'knex';
import { haveTestDb, openTestDb } from './test-db';
import { makeTemplate } from '../../src/lib/quantum/templates';
import { lowerCircuit } from '../../src/lib/quantum/lower';
import { checkCircuit } from '../../src/lib/quantum/check/index';
import type { CircuitDocument } from '../../src/lib/quantum/circuit';

// Checks on a real Redis (the throwaway one npm test starts) and real worker processes
// (`scripts/check-worker.ts`, what `npm run worker` runs). Every run uses its own queue prefix, so
// the workers here never meet another run's jobs. The expected results are computed in this
// process by the core's own single-process sweep (`checkCircuit` with every input): the sharded
// check must agree with it field for field.

// Before any import reads the settings (test-db imports the knexfile, which imports config).
const PREFIX = vi.hoisted(() => {
	const prefix = `itest${Date.now()}`;
	process.env.ORRERY_QUEUE_PREFIX = prefix;
	return prefix;
});
const SHARD = 16384;
const workerEnv = {
	...process.env,
	ORRERY_QUEUE_PREFIX: PREFIX,
	ORRERY_CHECK_SHARD_INPUTS: String(SHARD),
	ORRERY_WORKER_LOCK_MS: '3000',
	ORRERY_WORKER_BACKFILL: '0',
	ORRERY_CHECK_TEAM_CONCURRENCY: '4'
};

/**
 * A Fourier adder b += a on n-bit registers (2n input bits) with one planted fault: a controlled
 * phase of pi from a[0] onto b[n-1] (level n in the unswapped layout) adds 2^(n-1) whenever
 * a[0] = 1, so exactly the inputs with odd a fail, each with success probability 0. Invented test circuit.
 */
function faultyAdder(n: number): CircuitDocument {
	const d = makeTemplate('adder', `faulty ${n}-bit adder`, n);
	d.body.splice(2, 0, { id: 'planted', type: 'gate', gate: 'cp', qubits: [{ register: 'a', index: 0 }, { register: 'b', index: n - 1 }], angle: 'pi' });
	return d;
}

describe.skipIf(!haveTestDb)('server checks on BullMQ: sharded sweeps, a killed worker, cancel', () => {
	const db: Knex = haveTestDb ? openTestDb() : (null as never);
	let queue: Queue;
	let redis: Redis;
	let enqueue: typeof import('../../src/lib/server/checks/enqueue');
	let store: typeof import('../../src/lib/server/checks/store');
	let redisKeys: typeof import('../../src/lib/server/checks/redis').redisKeys;
	let teamId = '';
	let userId = '';
	const workers: ChildProcess[] = [];

	function startWorker(): ChildProcess & { output: string[] } {
		const w = spawn(process.execPath, ['--import', 'tsx', 'scripts/check-worker.ts'], { env: workerEnv, stdio: ['ignore', 'pipe', 'pipe'] }) as ChildProcess & { output: string[] };
		w.output = [];
		w.stdout!.on('data', (b) => w.output.push(...String(b).split('\n').filter(Boolean)));
		w.stderr!.on('data', (b) => w.output.push(...String(b).split('\n').filter(Boolean)));
		workers.push(w);
		return w;
	}
	async function stopWorkers() {
		await Promise.all(
			workers.splice(0).map(
				(w) =>
					new Promise<void>((resolve) => {
						if (w.exitCode !== null || w.signalCode !== null) return resolve();
						w.once('exit', () => resolve());
						w.kill('SIGTERM');
						setTimeout(() => w.kill('SIGKILL'), 20_000).unref();
					})
			)
		);
	}

	async function newCircuit(doc: CircuitDocument): Promise<string> {
		const { createCircuit } = await import('../../src/lib/server/repositories/circuits');
		return (await createCircuit(db, teamId, userId, doc)).circuit.id;
	}

	async function waitFor<T>(what: string, probe: () => Promise<T | null | undefined | false>, ms: number): Promise<T> {
		const until = Date.now() + ms;
		for (;;) {
			const v = await probe();
			if (v) return v;
			if (Date.now() > until) throw new Error(`timed out waiting for ${what}`);
			await new Promise((r) => setTimeout(r, 200));
		}
	}
	const finished = (id: string) => waitFor(`check ${id} to finish`, async () => {
		const row = await store.findCheck(db, id);
		return row && store.isFinished(row.status) ? row : null;
	}, 15 * 60_000);

	/** The reference: one process, every input, the core's own sweep. */
	function reference(doc: CircuitDocument) {
		return checkCircuit(lowerCircuit(doc), doc.specs!, { inputs: { mode: 'all' }, proof: false });
	}

	beforeAll(async () => {
		await db.migrate.latest();
		enqueue = await import('../../src/lib/server/checks/enqueue');
		store = await import('../../src/lib/server/checks/store');
		redisKeys = (await import('../../src/lib/server/checks/redis')).redisKeys;
		expect(redisKeys.progress('x')).toBe(`${PREFIX}:check:x:progress`);
		const { CHECK_QUEUE } = await import('../../src/lib/server/checks/redis');
		redis = new Redis(process.env.ORRERY_REDIS_URL!);
		queue = new Queue(CHECK_QUEUE, { connection: { url: process.env.ORRERY_REDIS_URL, maxRetriesPerRequest: null }, prefix: PREFIX });
		const { insertUser } = await import('../../src/lib/server/repositories/users');
		const teams = await import('../../src/lib/server/repositories/teams');
		userId = (await insertUser(db, { email: `queue-${Date.now()}@integration.example`, name: 'Queue Tester', passwordHash: 'h' })).id;
		teamId = (await teams.createTeam(db, `Queue ${Date.now()}`, userId)).id;
	}, 120_000);

	afterAll(async () => {
		await stopWorkers();
		await queue?.obliterate({ force: true }).catch(() => undefined);
		await queue?.close();
		redis?.disconnect();
		await enqueue?.closeCheckQueue();
		await db?.destroy();
		const appDb = await import('../../src/lib/server/db');
		await appDb.db.destroy();
	}, 60_000);

	it('a save never waits on a dead queue: the check is marked "could not be queued" within the timeout', async () => {
		const circuitId = await newCircuit(makeTemplate('adder', 'dead queue adder', 3));
		// Port 1 on loopback: nothing listens there on these machines (common practice).
		const dead = new Queue('checks', { connection: { host: '127.0.0.1', port: 1, maxRetriesPerRequest: 1, enableOfflineQueue: false, retryStrategy: () => null }, prefix: PREFIX });
		dead.on('error', () => undefined);
		const t0 = Date.now();
		const row = (await enqueue.enqueueCheck(db, { teamId, circuitId, version: 1, userId, reason: 'save' }, dead))!;
		expect(Date.now() - t0).toBeLessThan(enqueue.ENQUEUE_TIMEOUT_MS + 2000);
		const after = (await store.findCheck(db, row.id))!;
		expect(after.status).toBe('error');
		expect(after.message).toContain('could not be queued');
		await dead.close().catch(() => undefined);
	});

	it('a requested check is taken before the backfill queued ahead of it (backfill jobs carry a BullMQ priority, requested ones none)', async () => {
		// A queue of its own with one in-test worker, so the test's real workers never see these jobs.
		const probe = new Queue('priority-probe', { connection: { url: process.env.ORRERY_REDIS_URL, maxRetriesPerRequest: null }, prefix: PREFIX });
		const circuitId = await newCircuit(makeTemplate('adder', 'priority adder', 3));
		const backfill = (await enqueue.enqueueCheck(db, { teamId, circuitId, version: 1, userId: null, reason: 'seed' }, probe))!;
		const requested = (await enqueue.enqueueCheck(db, { teamId, circuitId, version: 1, userId, reason: 'request' }, probe))!;
		expect((await probe.getJob(`${backfill.id}-plan`))!.opts.priority).toBeGreaterThan(0);
		expect((await probe.getJob(`${requested.id}-plan`))!.opts.priority ?? 0).toBe(0);
		const order: string[] = [];
		const worker = new Worker('priority-probe', async (job) => void order.push(job.data.checkId), { connection: { url: process.env.ORRERY_REDIS_URL, maxRetriesPerRequest: null }, prefix: PREFIX, concurrency: 1 });
		await waitFor('both probe jobs', async () => order.length === 2, 30_000);
		await worker.close();
		await probe.obliterate({ force: true });
		await probe.close();
		expect(order).toEqual([requested.id, backfill.id]);
	});

	it('two worker processes split a 2^20-input sweep into shards and merge it to the single-process result', async () => {
		const doc = faultyAdder(10);
		const circuitId = await newCircuit(doc);
		const a = startWorker();
		const b = startWorker();
		const row = (await enqueue.enqueueCheck(db, { teamId, circuitId, version: 1, userId, reason: 'request' }, queue))!;
		const ref = reference(doc);
		const done = await finished(row.id);
		expect(done.status, `${done.message}\n${a.output.join('\n')}\n${b.output.join('\n')}`).toBe('fail');
		// The reference is exhaustive over 2^20 inputs; half of them (odd a) fail with probability 0.
		expect(ref.cases).toBe(2 ** 20);
		expect(ref.failed).toBe(2 ** 19);
		expect(done.inputs_total).toBe(2 ** 20);
		expect(done.shards_total).toBe(2 ** 20 / SHARD);
		expect(done.exhaustive).toBe(true);
		expect([done.cases, done.failed, done.worst_probability]).toEqual([ref.cases, ref.failed, ref.worstSuccessProbability]);
		expect(done.result!.failures).toEqual(ref.failures);
		expect(done.result!.engines).toEqual(ref.engines);
		// Every shard met the one sweep's global phase (no input was judged against another reference).
		expect(new Set((await store.listShards(db, row.id)).flatMap((x) => x.phaseReferences))).toEqual(new Set([ref.phaseReference]));
		expect(done.method).toBe('sweep+proof');
		expect(done.proof_status).toBe('refuted');
		const shards = await store.listShards(db, row.id);
		expect(shards).toHaveLength(2 ** 20 / SHARD);
		// Both processes took shards (each row names the host and pid that computed it).
		expect(new Set(shards.map((s) => s.workerHost)).size).toBe(2);
		await stopWorkers();
	}, 20 * 60_000);

	it('kill -9 of a worker in the middle of a shard still ends with the complete, correct result', async () => {
		const doc = faultyAdder(9);
		const circuitId = await newCircuit(doc);
		const victim = startWorker();
		const survivor = startWorker();
		const row = (await enqueue.enqueueCheck(db, { teamId, circuitId, version: 1, userId, reason: 'request' }, queue))!;
		// Wait until the victim has started a shard and reported progress inside it, then kill it without warning.
		const victimPid = String(victim.pid);
		await waitFor('the victim to be inside a shard', async () => {
			const active = await queue.getActive();
			const progress = await redis.hgetall(redisKeys.progress(row.id));
			const mine = victim.output.some((l) => l.includes('shard') && l.includes(`pid ${victimPid}`));
			return mine && active.length > 0 && Object.keys(progress).length > 0;
		}, 5 * 60_000);
		const before = await store.countShards(db, row.id);
		process.kill(victim.pid!, 'SIGKILL');
		const ref = reference(doc);
		const done = await finished(row.id);
		expect(done.status, `${done.message}\n${survivor.output.join('\n')}`).toBe('fail');
		expect(before.shards).toBeLessThan(2 ** 18 / SHARD);
		expect([done.cases, done.failed, done.worst_probability]).toEqual([ref.cases, ref.failed, ref.worstSuccessProbability]);
		expect(done.result!.failures).toEqual(ref.failures);
		const shards = await store.listShards(db, row.id);
		expect(shards.map((s) => s.shard)).toEqual(Array.from({ length: 2 ** 18 / SHARD }, (_, i) => i));
		expect(shards.reduce((s, x) => s + x.cases, 0)).toBe(2 ** 18);
		await stopWorkers();
	}, 20 * 60_000);

	it('a cancelled check stops its shards: no verdict, no more shard rows, no job left running', async () => {
		const doc = faultyAdder(10);
		const circuitId = await newCircuit(doc);
		startWorker();
		startWorker();
		const row = (await enqueue.enqueueCheck(db, { teamId, circuitId, version: 1, userId, reason: 'request' }, queue))!;
		await waitFor('a first shard', async () => (await store.countShards(db, row.id)).shards >= 1, 10 * 60_000);
		const atCancel = await store.countShards(db, row.id);
		const cancelled = await enqueue.requestCancel(db, row.id, userId, redis);
		expect(cancelled).toBe(true);
		// Running shards notice the flag after their current chunk; waiting ones return at once.
		await waitFor('the queue to drain', async () => (await queue.getActiveCount()) + (await queue.getWaitingCount()) === 0, 5 * 60_000);
		const after = await store.countShards(db, row.id);
		await new Promise((r) => setTimeout(r, 2000));
		expect(await store.countShards(db, row.id)).toEqual(after);
		expect(after.shards).toBeLessThan(2 ** 20 / SHARD);
		// At most the shards already finishing their last chunk (one per worker) land after the cancel.
		expect(after.shards).toBeLessThanOrEqual(atCancel.shards + 2);
		expect(workers.some((w) => (w as ChildProcess & { output: string[] }).output.some((l) => l.includes('stopped: the check was cancelled')))).toBe(true);
		const final = (await store.findCheck(db, row.id))!;
		expect(final.status).toBe('cancelled');
		expect(final.cancelled_by).toBe(userId);
		await stopWorkers();
	}, 20 * 60_000);
});
