// Queue benches, run by scripts/bench-queue.sh against a throwaway MariaDB and Redis:
//  - sweep throughput of one sharded check with 1 worker process, then with 2, as inputs/s, and
//    their ratio (measured in the same run; this machine has 2 cores shared with everything else);
//  - the latency a small check gains by going through the queue: enqueue → verdict in the database,
//    minus the same check computed in this process (median of several).
// Usage: node --import tsx scripts/bench-queue.ts [bits=18]
import { spawn, type ChildProcess } from 'node:child_process';
import knex from 'knex';
import knexConfig from '../knexfile';
import { makeTemplate } from '../src/lib/quantum/templates';
import { lowerCircuit } from '../src/lib/quantum/lower';
import { checkCircuit } from '../src/lib/quantum/check/index';
import type { CircuitDocument } from '../src/lib/quantum/circuit';
import { newId, sha256 } from '../src/lib/server/ids';
import { enqueueCheck, closeCheckQueue } from '../src/lib/server/checks/enqueue';
import { findCheck, isFinished } from '../src/lib/server/checks/store';

const bits = Number(process.argv[2] ?? 18);
const db = knex(knexConfig);
const SHARD = 2 ** Math.max(10, bits - 4); // 16 shards
const env = { ...process.env, ORRERY_CHECK_SHARD_INPUTS: String(SHARD), ORRERY_WORKER_BACKFILL: '0', ORRERY_CHECK_TEAM_CONCURRENCY: '8' };

function startWorkers(n: number): ChildProcess[] {
	return Array.from({ length: n }, () => spawn(process.execPath, ['--import', 'tsx', 'scripts/check-worker.ts'], { env, stdio: ['ignore', 'pipe', 'inherit'] }));
}
async function stopWorkers(ws: ChildProcess[]) {
	await Promise.all(ws.map((w) => new Promise<void>((r) => (w.exitCode !== null ? r() : (w.once('exit', () => r()), w.kill('SIGTERM'))))));
}
/** Resolves when every worker has printed its start line (it then listens on the queue). */
function ready(ws: ChildProcess[]) {
	return Promise.all(ws.map((w) => new Promise<void>((r) => w.stdout!.on('data', (b) => String(b).includes('check worker') && r()))));
}

const userId = newId();
const teamId = newId();
await db('users').insert({ id: userId, email: `bench-${userId}@bench.example`, name: 'Bench', password_hash: 'x' });
await db('teams').insert({ id: teamId, slug: `bench-${teamId}`, name: 'Bench' });
async function circuit(doc: CircuitDocument): Promise<string> {
	const id = newId();
	const text = JSON.stringify(doc);
	await db('circuits').insert({ id, team_id: teamId, title: doc.title, created_by: userId, latest_version: 1 });
	await db('circuit_versions').insert({ id: newId(), circuit_id: id, version: 1, document: text, hash: sha256(text), created_by: userId });
	return id;
}
async function run(circuitId: string): Promise<{ ms: number; cases: number; queuedMs: number }> {
	const t0 = performance.now();
	const row = (await enqueueCheck(db, { teamId, circuitId, version: 1, userId, reason: 'request' }))!;
	for (;;) {
		const r = (await findCheck(db, row.id))!;
		if (isFinished(r.status)) {
			if (r.status !== 'pass') throw new Error(`bench check ended ${r.status}: ${r.message}`);
			return { ms: r.duration_ms ?? 0, cases: r.cases, queuedMs: performance.now() - t0 };
		}
		await new Promise((res) => setTimeout(res, 20));
	}
}

const big = await circuit(makeTemplate('adder', `bench adder ${bits}`, bits / 2));
const rates: number[] = [];
for (const n of [1, 2]) {
	const ws = startWorkers(n);
	await ready(ws);
	const r = await run(big);
	const rate = (r.cases * 1000) / r.ms;
	rates.push(rate);
	console.log(`bench queue sweep 2^${bits} inputs (${2 ** bits / SHARD} shards), ${n} worker${n > 1 ? 's' : ''}: ${Math.round(rate)} inputs/s (${(r.ms / 1000).toFixed(1)} s)`);
	await stopWorkers(ws);
}
console.log(`bench queue sweep speed-up 2 workers / 1 worker: ${(rates[1] / rates[0]).toFixed(2)}x`);

const smallDoc = makeTemplate('adder', 'bench small adder', 3);
const small = await circuit(smallDoc);
const lowered = lowerCircuit(smallDoc);
const ws = startWorkers(1);
await ready(ws);
await run(small); // warm the worker
const added: number[] = [];
const direct: number[] = [];
for (let i = 0; i < 9; i++) {
	const t = performance.now();
	checkCircuit(lowered, smallDoc.specs!, { inputs: { mode: 'all' } });
	const d = performance.now() - t;
	direct.push(d);
	added.push((await run(small)).queuedMs - d);
}
await stopWorkers(ws);
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
console.log(`bench queue small check (3-bit adder, 64 inputs): ${median(direct).toFixed(1)} ms computed here; through the queue +${median(added).toFixed(0)} ms (enqueue to verdict in the database, median of 9)`);
await closeCheckQueue();
await db.destroy();
