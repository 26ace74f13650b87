// The one module that reads settings and secrets from the environment.
// Scripts (migrations, seeds, the mail fake) import it too, so it must not use $env.

// Settings named ORRERY_* were PW_* before the rename: the old names work for one release, with a warning.
const warned = new Set<string>();
function read(name: string, fallback?: string): string {
	const v = process.env[name];
	if (v !== undefined && v !== '') return v;
	if (name.startsWith('ORRERY_')) {
		const old = 'PW_' + name.slice('ORRERY_'.length);
		const legacy = process.env[old];
		if (legacy !== undefined && legacy !== '') {
			if (!warned.has(old)) console.warn(`warning: ${old} is the old name of ${name}; it will stop working in the next release`);
			warned.add(old);
			return legacy;
		}
	}
	if (fallback !== undefined) return fallback;
	throw new Error(`environment variable ${name} is not set`);
}

export const config = {
	db: {
		host: read('DB_HOST', '127.0.0.1'),
		port: Number(read('DB_PORT', '3317')),
		database: read('DB_NAME', 'orrery'),
		user: read('DB_USER', 'orrery'),
		password: read('DB_PASSWORD', 'orrery-local')
	},
	smtpUrl: read('SMTP_URL', 'smtp://127.0.0.1:2525'),
	mailFrom: read('MAIL_FROM', 'Orrery <no-reply@orrery.local>'),
	mailDir: read('MAIL_DIR', '.data/mail'),
	origin: read('ORIGIN', 'http://127.0.0.1:3000'),
	production: read('NODE_ENV', 'development') === 'production',
	/** One Redis for the check queue and the shared rate limits (every app process and worker uses the same). */
	redisUrl: read('ORRERY_REDIS_URL', 'redis://127.0.0.1:6390'),
	checks: {
		/** Key prefix of the queues in Redis (tests give each run its own). */
		queuePrefix: read('ORRERY_QUEUE_PREFIX', 'orrery'),
		/** Checks of one team running at once; more wait in the queue. */
		teamConcurrency: Number(read('ORRERY_CHECK_TEAM_CONCURRENCY', '2')),
		/** Jobs one worker process runs at once (each is synchronous compute: 1 per core is right). */
		workerConcurrency: Number(read('ORRERY_WORKER_CONCURRENCY', '1')),
		/** Largest exhaustive sweep, in input bits; wider domains get the proof and a seeded sample. */
		maxSweepBits: Number(read('ORRERY_CHECK_MAX_SWEEP_BITS', '24')),
		/** Inputs per shard of a sharded sweep (domains up to this size run as one job). */
		shardInputs: Number(read('ORRERY_CHECK_SHARD_INPUTS', '65536')),
		/** Wall-clock limit of one check, in seconds; past it the check stops with a message. */
		maxSeconds: Number(read('ORRERY_CHECK_MAX_SECONDS', '900')),
		/** How long a worker's lock on a job lasts without renewal; a dead worker's job is retried after about this long. */
		lockMs: Number(read('ORRERY_WORKER_LOCK_MS', '30000'))
	},
	/** The worker-thread pool for heavy request work (server/heavy/pool.ts). */
	heavy: {
		/** Milliseconds one task may run once a thread has started it (wall clock); then 422. */
		timeMs: Number(read('ORRERY_HEAVY_TIME_MS', '15000')),
		/** Old-generation heap of one thread, MiB; past it the thread is stopped and the request gets 413. */
		memoryMb: Number(read('ORRERY_HEAVY_MEMORY_MB', '512')),
		/** Milliseconds a task may wait for a free thread; then 503 (try again). */
		queueMs: Number(read('ORRERY_HEAVY_QUEUE_MS', '60000')),
		/** Threads; 0 = at least 2 (one hostile task never holds up every other), at most 4, cores − 1. */
		threads: Number(read('ORRERY_HEAVY_THREADS', '0')),
		/** Path of the thread's bundle, when not the one beside the built server (or built on first use in dev). */
		workerFile: read('ORRERY_HEAVY_WORKER', '')
	},
	/** Serves /bench/* pages for `npm run bench` (never set in production). */
	benchPages: read('ORRERY_BENCH_PAGES', '0') === '1'
};

/**
 * Whether `/dev/outbox` (the mail the local fake caught) may be served at all. It holds reset and
 * invitation links, so it is on only under `npm run dev` (vite's dev server: `dev` from
 * `$app/environment`) and under the test runner (ORRERY_TEST_RUN=1 with ORRERY_DEV_OUTBOX=1, as
 * scripts/test.sh sets them). A plain `npm start` (a built app) has it off whatever else is set,
 * and NODE_ENV=production forces it off everywhere. Even when on, the page shows a signed-in user
 * only the mail addressed to them (see the route).
 */
export function outboxAllowed(env: Record<string, string | undefined>, viteDev: boolean): boolean {
	if (env.NODE_ENV === 'production') return false;
	const asked = env.ORRERY_DEV_OUTBOX ?? env.PW_DEV_OUTBOX;
	if (asked === '0') return false;
	if (viteDev) return true;
	return env.ORRERY_TEST_RUN === '1' && asked === '1';
}
