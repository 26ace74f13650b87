// What a check worker does with each job of the check queue. Three kinds of job:
//   plan  {checkId}                    take a team slot, lower the version, run the proof, decide the sweep;
//                                      a small domain is swept right here, a large one becomes a flow:
//   merge {checkId}  (flow parent)     runs when every shard child is done; merges the shard rows
//   shard {checkId, shard, start, end} sweeps inputs [start, end) in chunks, writes its row once
// Every computation calls the pure core (`checkCircuit`), so a stronger prover or sweep there is
// picked up without a change here. Simulated, not a hardware run.
import type { Knex } from 'knex';
import type { Redis } from 'ioredis';
import { DelayedError, UnrecoverableError, type FlowProducer, type Job } from 'bullmq';
import { lowerCircuit } from '../../quantum/lower';
import { parseCircuitDocument } from '../../quantum/schema';
import { checkCircuit, type CheckOptions, type CheckReport } from '../../quantum/check/index';
import type { LoweredCircuit } from '../../quantum/circuit';
import { CHECK_QUEUE, KEY_TTL_SECONDS, redisKeys } from './redis';
import { addSweepPart, engineName, jobPriority, mergeShards, nextChunkSize, planShards, type ShardOutcome } from './plan';
import { finishCheck, findCheck, listShards, recordPlan, recordShard, startCheck, type CheckResult, type CheckRow, type Verdict } from './store';

export type CheckJobData = { checkId: string } | { checkId: string; shard: number; start: number; end: number };

export interface CheckSettings {
	teamConcurrency: number;
	maxSweepBits: number;
	shardInputs: number;
	maxSeconds: number;
}

export interface ProcessorDeps {
	db: Knex;
	redis: Redis;
	flow: FlowProducer;
	/** Host name and process id, recorded with every shard and verdict. */
	host: string;
	settings: CheckSettings;
	queuePrefix: string;
}

/** Most inputs per synchronous call into the core: between chunks the worker renews its lock, reports progress and reads cancel. */
export const CHUNK_INPUTS = 4096;
/** Inputs of a sweep's first call; the pace it shows sizes the next ones (nextChunkSize). */
export const FIRST_CHUNK_INPUTS = 16;
/** Milliseconds of work one call aims at, so the time limit and cancel are looked at about this often. */
export const CHUNK_TARGET_MS = 1000;
/** Seeded sample size when a domain is over the exhaustive cap. */
export const SAMPLE_INPUTS = 4096;

class CheckStop extends Error {}

export async function processCheckJob(job: Job<CheckJobData>, token: string | undefined, deps: ProcessorDeps): Promise<unknown> {
	if (job.name === 'plan') return plan(job, token, deps);
	if (job.name === 'shard') return shard(job.data as { checkId: string; shard: number; start: number; end: number }, deps);
	if (job.name === 'merge') return merge(job.data.checkId, deps);
	throw new UnrecoverableError(`unknown check job ${job.name}`);
}

async function cancelled(deps: ProcessorDeps, checkId: string): Promise<boolean> {
	return (await deps.redis.exists(redisKeys.cancel(checkId))) === 1;
}

function fail(host: string, message: string): Verdict {
	return { status: 'error', method: null, engine: null, proofStatus: null, cases: 0, failed: 0, exhaustive: false, worstProbability: null, message, result: null, host };
}

/** The version's lowered circuit, specs and domain, or a sentence saying why it cannot be checked. */
async function loadVersion(deps: ProcessorDeps, row: CheckRow): Promise<{ ok: true; c: LoweredCircuit; specs: string[]; assume: string[] } | { ok: false; message: string }> {
	const v = await deps.db('circuit_versions').where({ id: row.circuit_version_id }).first('document');
	if (!v) return { ok: false, message: `version ${row.version} no longer exists` };
	const parsed = parseCircuitDocument(typeof v.document === 'string' ? JSON.parse(v.document) : v.document);
	if (!parsed.ok) return { ok: false, message: `version ${row.version} is not a valid document: ${parsed.issues.slice(0, 3).map((i) => `${i.path}: ${i.message}`).join('; ')}` };
	const specs = parsed.document.specs ?? [];
	if (specs.length === 0) return { ok: false, message: `version ${row.version} has no specs, so there is nothing to check; add one such as "b = a + b mod 8"` };
	try {
		return { ok: true, c: lowerCircuit(parsed.document), specs, assume: parsed.document.assume ?? [] };
	} catch (e) {
		return { ok: false, message: `version ${row.version} does not lower: ${(e as Error).message}` };
	}
}

/** Options for the core; `assume` goes along for a core that reads the document's domain. */
function coreOptions(inputs: CheckOptions['inputs'], proof: boolean, assume: string[]): CheckOptions {
	const o: CheckOptions & { assume?: string[] } = { inputs, proof };
	if (assume.length) o.assume = assume;
	return o;
}

function deadlineOf(row: CheckRow, deps: ProcessorDeps): number {
	return (row.started_at ?? new Date()).getTime() + deps.settings.maxSeconds * 1000;
}

/**
 * Sweep inputs [start, end) in chunks sized from the pace of the last one (about CHUNK_TARGET_MS
 * each, at most CHUNK_INPUTS, never past the deadline). Between chunks: progress to Redis, the
 * cancel flag and the time limit. Returns null when cancelled; throws CheckStop past the limit.
 */
async function sweepRange(deps: ProcessorDeps, row: CheckRow, c: LoweredCircuit, specs: string[], assume: string[], shard: number, start: number, end: number): Promise<ShardOutcome | null> {
	const out: ShardOutcome = { shard, start, end, cases: 0, failed: 0, worstProbability: 1, failures: [], engines: { ledger: 0, amplitudes: 0 }, phaseReferences: [] };
	const deadline = deadlineOf(row, deps);
	const progressKey = redisKeys.progress(row.id);
	let size = FIRST_CHUNK_INPUTS;
	for (let a = start; a < end; ) {
		const b = Math.min(end, a + size);
		const t0 = performance.now();
		const r = checkCircuit(c, specs, coreOptions({ mode: 'range', start: a, end: b }, false, assume));
		size = nextChunkSize({ inputs: b - a, ms: performance.now() - t0 }, deadline - Date.now(), CHUNK_TARGET_MS, CHUNK_INPUTS);
		addSweepPart(out, { ...r, worstProbability: r.worstSuccessProbability, phaseReferences: r.phaseReference ? [r.phaseReference] : [] });
		await deps.redis.multi().hset(progressKey, String(shard), b - start).expire(progressKey, KEY_TTL_SECONDS).exec();
		if (await cancelled(deps, row.id)) return null;
		if (Date.now() > deadline && b < end) throw new CheckStop(`stopped after ${deps.settings.maxSeconds} s, the server's limit for one check; raise ORRERY_CHECK_MAX_SECONDS or narrow the domain with assume`);
		a = b;
	}
	return out;
}

function baseResult(head: CheckReport, assume: string[]): CheckResult {
	return {
		specs: head.specs,
		assume,
		inputBits: head.inputs.bits,
		inputRegisters: head.inputs.registers,
		engines: { ledger: 0, amplitudes: 0 },
		failures: [],
		wrongTerms: head.wrongTerms,
		suspects: head.proof.status === 'refuted' ? head.suspects : [],
		proof: { status: head.proof.status, reason: head.proof.reason, termsChecked: head.proof.termsChecked },
		notes: head.notes.filter((n) => n !== 'one given input')
	};
}

/** The proof counted: it ran and the circuit was inside the form it decides. */
const proofApplied = (status: string) => status !== 'skipped' && status !== 'outside' && status !== 'undecided';

function verdictOf(
	result: CheckResult,
	sweep: { cases: number; failed: number; worstProbability: number; failures: unknown[]; engines: { ledger: number; amplitudes: number }; phaseReferences?: string[] },
	exhaustive: boolean,
	host: string,
	message: string | null
): Verdict {
	const refuted = result.proof.status === 'refuted';
	// Parts of the sweep that met different global phases: one sweep would have failed the inputs
	// whose phase differs from the first passing input's. The verdict is fail; the counts are per part.
	const phases = sweep.phaseReferences ?? [];
	if (phases.length > 1) {
		const note = `inputs end with the right values but different global phases (${phases.slice(0, 3).join(', ')}); the failure counts compare phases within each part of the sweep only`;
		return { ...verdictOf(result, { ...sweep, phaseReferences: [] }, exhaustive, host, message ? `${message}; ${note}` : note), status: 'fail' };
	}
	const applied = proofApplied(result.proof.status);
	const kind = exhaustive ? 'sweep' : 'sample';
	return {
		status: sweep.failed === 0 && !refuted ? 'pass' : 'fail',
		method: applied ? `${kind}+proof` : kind,
		engine: engineName(sweep.engines),
		proofStatus: result.proof.status,
		cases: sweep.cases,
		failed: sweep.failed,
		exhaustive,
		worstProbability: sweep.worstProbability,
		message,
		result: { ...result, engines: sweep.engines, failures: sweep.failures },
		host
	};
}

async function plan(job: Job<CheckJobData>, token: string | undefined, deps: ProcessorDeps): Promise<unknown> {
	const { checkId } = job.data;
	const start = await startCheck(deps.db, checkId, deps.settings.teamConcurrency, deps.host);
	if (!start.started) {
		if (start.why === 'busy') {
			// The team already runs its share: wait in the queue (no slot is held while waiting).
			await job.moveToDelayed(Date.now() + 1000 + Math.floor(Math.random() * 1000), token);
			throw new DelayedError();
		}
		return { skipped: start.why };
	}
	const row = start.row;
	if (await cancelled(deps, checkId)) return { cancelled: true };
	const loaded = await loadVersion(deps, row);
	if (!loaded.ok) {
		await finishCheck(deps.db, checkId, fail(deps.host, loaded.message));
		return { error: loaded.message };
	}
	const { c, specs, assume } = loaded;
	let head: CheckReport;
	try {
		// The proof, plus the all-zero input: the sweep proper follows.
		head = checkCircuit(c, specs, coreOptions({ mode: 'given', values: new Map() }, true, assume));
	} catch (e) {
		await finishCheck(deps.db, checkId, fail(deps.host, `the check could not run: ${(e as Error).message}`));
		return { error: (e as Error).message };
	}
	const result = baseResult(head, assume);
	const bits = head.inputs.bits;
	try {
		if (bits > deps.settings.maxSweepBits) {
			await recordPlan(deps.db, checkId, { inputsTotal: SAMPLE_INPUTS, shardsTotal: 1, exhaustive: false, result });
			const r = checkCircuit(c, specs, coreOptions({ mode: 'random', count: SAMPLE_INPUTS, seed: 1 }, false, assume));
			const message = `the domain has 2^${bits} inputs, above this server's cap of 2^${deps.settings.maxSweepBits} for an exhaustive sweep: ${proofApplied(result.proof.status) ? 'the proof covers every input; ' : ''}the sweep is a seeded sample of ${r.cases} inputs, not all of them`;
			await finishCheck(deps.db, checkId, verdictOf(result, { cases: r.cases, failed: r.failed, worstProbability: r.worstSuccessProbability, failures: r.failures, engines: r.engines }, false, deps.host, message));
			return { sampled: r.cases };
		}
		const total = 2 ** bits;
		const shards = planShards(total, deps.settings.shardInputs);
		await recordPlan(deps.db, checkId, { inputsTotal: total, shardsTotal: shards.length, exhaustive: true, result });
		if (shards.length === 1) {
			const t0 = performance.now();
			const s = await sweepRange(deps, row, c, specs, assume, 0, 0, total);
			if (!s) return { cancelled: true };
			await recordShard(deps.db, checkId, s, deps.host, performance.now() - t0);
			return merge(checkId, deps);
		}
		await deps.flow.add({
			name: 'merge',
			queueName: CHECK_QUEUE,
			data: { checkId },
			opts: { jobId: `${checkId}-merge`, ...jobPriority(row.reason), attempts: 3, backoff: { type: 'exponential', delay: 1000 }, removeOnComplete: 1000, removeOnFail: 1000 },
			children: shards.map((r, i) => ({
				name: 'shard',
				queueName: CHECK_QUEUE,
				data: { checkId, shard: i, start: r.start, end: r.end },
				opts: { jobId: `${checkId}-shard-${i}`, ...jobPriority(row.reason), attempts: 3, backoff: { type: 'exponential', delay: 1000 }, failParentOnFailure: true, removeOnComplete: 1000, removeOnFail: 1000 }
			}))
		});
		return { shards: shards.length };
	} catch (e) {
		// A limit, or a domain/engine limit the core states (RangeError), ends the check with its sentence.
		if (e instanceof CheckStop || e instanceof RangeError) {
			const message = e instanceof CheckStop ? e.message : `the sweep could not run: ${e.message}`;
			await finishCheck(deps.db, checkId, fail(deps.host, message));
			return { error: message };
		}
		throw e;
	}
}

async function shard(data: { checkId: string; shard: number; start: number; end: number }, deps: ProcessorDeps): Promise<unknown> {
	const row = await findCheck(deps.db, data.checkId);
	if (!row || row.status !== 'running') return { skipped: row?.status ?? 'gone' };
	if (await cancelled(deps, row.id)) return { cancelled: true };
	const loaded = await loadVersion(deps, row);
	if (!loaded.ok) {
		await finishCheck(deps.db, row.id, fail(deps.host, loaded.message));
		throw new UnrecoverableError(loaded.message);
	}
	console.log(`check ${row.id} shard ${data.shard} (inputs ${data.start}..${data.end - 1}) on ${deps.host}`);
	const t0 = performance.now();
	try {
		const s = await sweepRange(deps, row, loaded.c, loaded.specs, loaded.assume, data.shard, data.start, data.end);
		if (!s) {
			console.log(`check ${row.id} shard ${data.shard} stopped: the check was cancelled`);
			return { cancelled: true };
		}
		await recordShard(deps.db, row.id, s, deps.host, performance.now() - t0);
		return { shard: data.shard, cases: s.cases, failed: s.failed };
	} catch (e) {
		// A limit or an input the engines refuse ends the whole check with its sentence; the other shards stop.
		const message = e instanceof CheckStop ? e.message : e instanceof RangeError ? `the sweep stopped: ${e.message}` : null;
		if (message === null) throw e;
		await finishCheck(deps.db, row.id, fail(deps.host, message));
		await deps.redis.set(redisKeys.cancel(row.id), 'stopped', 'EX', KEY_TTL_SECONDS);
		throw new UnrecoverableError(message);
	}
}

async function merge(checkId: string, deps: ProcessorDeps): Promise<unknown> {
	const row = await findCheck(deps.db, checkId);
	if (!row || row.status !== 'running' || !row.result) return { skipped: row?.status ?? 'gone' };
	const merged = mergeShards(await listShards(deps.db, checkId), row.inputs_total);
	// Every child finished before the parent runs; a gap would mean a lost shard: fail loudly, never pass.
	if (merged.missing.length) throw new Error(`shards missing for inputs ${merged.missing.map((m) => `${m.start}..${m.end - 1}`).join(', ')}`);
	const message = row.shards_total > 1 ? `exhaustive sweep in ${row.shards_total} shards` : null;
	await finishCheck(deps.db, checkId, verdictOf(row.result, merged, true, deps.host, message));
	return { cases: merged.cases, failed: merged.failed };
}
