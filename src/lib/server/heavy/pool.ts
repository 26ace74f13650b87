// The worker-thread pool for heavy work (issue 10): imports, document checks with their gate count,
// traces computed on the server, report boards, exports. One Node process serves everyone, so a
// request that computes for seconds must not do it on the event loop. Each task runs in a pool
// thread (piscina) under two limits besides the work budgets inside the task:
//   - time: ORRERY_HEAVY_TIME_MS (default 15 s of wall clock, generous for a shared machine) from
//     the moment a thread starts it; past that the thread is terminated and the request gets 422
//     naming what was being done;
//   - memory: ORRERY_HEAVY_MEMORY_MB (default 512) of old-generation heap per thread; past that
//     V8 stops the thread and the request gets 413.
// A task waits in the queue at most queueWaitMs and the queue holds at most maxQueue tasks;
// past either the request gets 503 (try again). A killed thread is replaced; the server goes on.
import { existsSync } from 'node:fs';
import { availableParallelism } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { Piscina } from 'piscina';
import { error } from '@sveltejs/kit';
import type { Tasks, TaskName } from './tasks';
import { STARTED, type TaskReply, type TaskRequest } from './protocol';
import { onShutdown } from '../shutdown';
import { config } from '../config';

const positive = (v: number, fallback: number) => (Number.isFinite(v) && v > 0 ? v : fallback);

/** The pool's limits (from config; tests lower them). */
export const heavyLimits = {
	/** Milliseconds one task may run once a thread has started it. */
	timeMs: positive(config.heavy.timeMs, 15_000),
	/** Old-generation heap of one thread, MiB. */
	memoryMb: positive(config.heavy.memoryMb, 512),
	/** Threads: at least 2 (one hostile task never holds up every other), at most 4. */
	threads: positive(config.heavy.threads, Math.max(2, Math.min(4, availableParallelism() - 1))),
	/** Milliseconds a task may wait for a free thread before the request is told to retry. */
	queueWaitMs: positive(config.heavy.queueMs, 60_000),
	/** Tasks waiting at most; more answer 503 at once. */
	maxQueue: 64
};

/** Name of the bundle `vite build` writes beside the server (scripts/build-heavy-worker.mjs). */
export const HEAVY_WORKER_FILE = 'heavy-worker.js';

/**
 * Where the thread's code is. The built app (build/server/chunks/…, build/server/index.js) finds
 * build/heavy-worker.js by walking up from its own file. The dev server and vitest build it from
 * the sources with esbuild on first use. ORRERY_HEAVY_WORKER overrides both.
 */
async function workerFile(): Promise<string> {
	if (config.heavy.workerFile) return config.heavy.workerFile;
	let dir = dirname(fileURLToPath(import.meta.url));
	for (let i = 0; i < 4; i++, dir = dirname(dir)) {
		const f = join(dir, HEAVY_WORKER_FILE);
		if (existsSync(f)) return f;
	}
	if (!import.meta.env?.DEV)
		throw new Error(`${HEAVY_WORKER_FILE} is missing beside the built server (${dirname(fileURLToPath(import.meta.url))}): build with npm run build (vite build writes it).`);
	const script = pathToFileURL(join(process.cwd(), 'scripts', 'build-heavy-worker.mjs')).href;
	const { buildHeavyWorker } = (await import(/* @vite-ignore */ script)) as { buildHeavyWorker: () => Promise<string> };
	return buildHeavyWorker();
}

type Pool = { piscina: Piscina; started: Map<number, () => void> };
let pool: Promise<Pool> | null = null;
let nextId = 1;

function getPool(): Promise<Pool> {
	pool ??= workerFile().then((filename) => {
		const started = new Map<number, () => void>();
		const piscina = new Piscina({
			filename,
			minThreads: 1,
			maxThreads: heavyLimits.threads,
			idleTimeout: 60_000,
			maxQueue: heavyLimits.maxQueue,
			resourceLimits: { maxOldGenerationSizeMb: heavyLimits.memoryMb, maxYoungGenerationSizeMb: 64, stackSizeMb: 8 },
			// The threads do not share the web process's environment changes or arguments.
			execArgv: []
		});
		piscina.on('message', (m: unknown) => {
			const id = (m as Record<string, unknown> | null)?.[STARTED];
			if (typeof id === 'number') started.get(id)?.();
		});
		// A thread that dies with no task in hand (it should not) must not take the process down.
		piscina.on('error', (e: unknown) => console.error('heavy-work pool:', (e as Error).message));
		onShutdown('heavy-work pool', () => piscina.destroy());
		return { piscina, started };
	});
	return pool;
}

type Args<K extends TaskName> = Parameters<Tasks[K]>[0];
type Result<K extends TaskName> = ReturnType<Tasks[K]>;

/**
 * Run a heavy task in the pool. `what` says in words what is being done, for the messages past
 * the limits ("reading adder.qasm", "running the trace's circuit"). A refusal from inside the
 * task (error(422, …)) is thrown again here as the same HTTP error.
 */
export async function runHeavy<K extends TaskName>(task: K, args: Args<K>, what: string): Promise<Result<K>> {
	const { piscina, started } = await getPool();
	if (piscina.queueSize >= heavyLimits.maxQueue) busy();
	const id = nextId++;
	const ctl = new AbortController();
	let reason: 'time' | 'queue' | null = null;
	const abort = (r: 'time' | 'queue') => {
		reason = r;
		ctl.abort();
	};
	let timer = setTimeout(() => abort('queue'), heavyLimits.queueWaitMs);
	started.set(id, () => {
		clearTimeout(timer);
		timer = setTimeout(() => abort('time'), heavyLimits.timeMs);
	});
	let reply: TaskReply;
	try {
		reply = (await piscina.run({ id, task, args } satisfies TaskRequest, { signal: ctl.signal })) as TaskReply;
	} catch (e) {
		if (reason === 'time')
			error(422, { message: `${what}: stopped after ${heavyLimits.timeMs / 1000} s of computation, the server's limit for one request. Make the circuit smaller, or work on it with the command line (npm run orrery).`, code: 'bad_request' });
		if (reason === 'queue') busy();
		const err = e as { code?: string; message?: string };
		if (err.code === 'ERR_WORKER_OUT_OF_MEMORY')
			error(413, { message: `${what}: needed more than ${heavyLimits.memoryMb} MiB of memory, the server's limit for one request. Make the circuit smaller, or work on it with the command line (npm run orrery).`, code: 'bad_request' });
		if (err.message === 'Task queue is at limit') busy();
		throw e;
	} finally {
		clearTimeout(timer);
		started.delete(id);
	}
	if (!reply.ok) error(reply.status, { message: reply.message, code: reply.code });
	return reply.value as Result<K>;
}

function busy(): never {
	error(503, { message: 'The server is busy with other large circuits; try again in a minute.', code: 'internal' });
}

/** Threads running or idle, and tasks waiting (for tests and the load script). */
export async function heavyPoolState(): Promise<{ threads: number; queued: number }> {
	const { piscina } = await getPool();
	return { threads: piscina.threads.length, queued: piscina.queueSize };
}
