// npm run worker: one check worker (BullMQ) in the foreground. Settings from the environment, as the
// app reads them (scripts/env.sh for development): DB_*, ORRERY_REDIS_URL, ORRERY_WORKER_CONCURRENCY, ORRERY_CHECK_*.
// Ctrl-C (SIGINT) or SIGTERM finish the current chunk of inputs and close.
import knex from 'knex';
import knexConfig from '../knexfile';
import { config } from '../src/lib/server/config';
import { backfillChecks, startCheckWorker } from '../src/lib/server/checks/worker';
import { closeCheckQueue } from '../src/lib/server/checks/enqueue';

const db = knex(knexConfig);
const w = startCheckWorker(db);
const where = config.redisUrl.replace(/\/\/[^@]*@/, '//');
console.log(`orrery check worker ${process.pid}: queue "${config.checks.queuePrefix}:checks" on ${where}, concurrency ${config.checks.workerConcurrency}`);
if (process.env.ORRERY_WORKER_BACKFILL !== '0') {
	backfillChecks(db)
		.then((n) => n && console.log(`queued ${n} check${n === 1 ? '' : 's'} of versions never checked`))
		.catch((e) => console.error(`backfill: ${(e as Error).message}`));
}
let closing = false;
async function stop() {
	if (closing) return;
	closing = true;
	await w.close();
	await closeCheckQueue();
	await db.destroy();
	process.exit(0);
}
process.on('SIGINT', stop);
process.on('SIGTERM', stop);
