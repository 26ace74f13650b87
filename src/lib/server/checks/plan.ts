// Pure parts of a server check: how a sweep is cut into shards and how shard results merge into
// one verdict. No database, Redis or BullMQ here, so the unit tests cover them directly.
import type { SweepCase } from '../../quantum/check/index';
import type { CheckReason } from './store';

/** One shard's outcome, as stored in check_shards (keyed by check and shard index). */
export interface ShardOutcome {
	shard: number;
	start: number;
	end: number;
	cases: number;
	failed: number;
	worstProbability: number;
	/** First failing inputs of this shard, in input order (at most KEEP_FAILURES). */
	failures: SweepCase[];
	engines: { ledger: number; amplitudes: number };
	/**
	 * The distinct global-phase references of this shard's chunks, in input order. The core compares
	 * each passing input's phase with the first passing input it swept; a part of a sweep starts its
	 * own reference, so the parts agree with one sweep only when every reference is the same.
	 */
	phaseReferences: string[];
}

/** Failing inputs a check keeps (the first ones in input order). */
export const KEEP_FAILURES = 20;

/** Cut [0, total) into consecutive ranges of `size` inputs (the last may be shorter). */
export function planShards(total: number, size: number): { start: number; end: number }[] {
	if (!Number.isSafeInteger(total) || total < 0) throw new RangeError(`cannot shard ${total} inputs`);
	if (!Number.isSafeInteger(size) || size < 1) throw new RangeError(`shard size must be a positive integer, not ${size}`);
	const out: { start: number; end: number }[] = [];
	for (let start = 0; start < total; start += size) out.push({ start, end: Math.min(total, start + size) });
	return out;
}

/**
 * Inputs for the next synchronous call into the core during a sweep, from the pace of the last
 * call: about `targetMs` of work, never more than the time left before the check's deadline, at
 * least 1 and at most `max`. The time limit is only looked at between calls, so a call's length
 * is what a check can overrun its limit by: sized this way that is one target's worth (or one
 * input, for a circuit whose single input takes longer), not `max` inputs of a slow circuit.
 */
export function nextChunkSize(last: { inputs: number; ms: number }, remainingMs: number, targetMs: number, max: number): number {
	const perInput = Math.max(last.ms, 0.001) / Math.max(last.inputs, 1);
	const budget = Math.min(targetMs, Math.max(remainingMs, 0));
	return Math.max(1, Math.min(max, Math.floor(budget / perInput)));
}

export interface MergedSweep {
	cases: number;
	failed: number;
	worstProbability: number;
	failures: SweepCase[];
	engines: { ledger: number; amplitudes: number };
	/** Index ranges no shard covered (empty when the sweep is complete). */
	missing: { start: number; end: number }[];
	/** Distinct phase references met, in input order: more than one means some input fails on its phase. */
	phaseReferences: string[];
}

/**
 * Merge shard outcomes of a sweep over [0, total). Each shard index counts once whatever order the
 * rows come in (a duplicate of the same shard is ignored), and ranges no shard covered are listed,
 * so a caller can refuse to call an incomplete sweep exhaustive.
 */
/** The counts of one part of a sweep (a chunk or a shard), as added into a running total. */
export type SweepPart = Pick<ShardOutcome, 'cases' | 'failed' | 'worstProbability' | 'failures' | 'engines'> & { phaseReferences?: string[] };

/** Add one part of a sweep into a total: counts, worst probability, first `keep` failures, engines, phase references. */
export function addSweepPart(out: SweepPart & { phaseReferences: string[] }, r: SweepPart, keep = KEEP_FAILURES): void {
	out.cases += r.cases;
	out.failed += r.failed;
	if (r.worstProbability < out.worstProbability) out.worstProbability = r.worstProbability;
	for (const f of r.failures) if (out.failures.length < keep) out.failures.push(f);
	out.engines.ledger += r.engines.ledger;
	out.engines.amplitudes += r.engines.amplitudes;
	for (const p of r.phaseReferences ?? []) if (!out.phaseReferences.includes(p)) out.phaseReferences.push(p);
}

export function mergeShards(rows: ShardOutcome[], total: number, keep = KEEP_FAILURES): MergedSweep {
	const byShard = new Map<number, ShardOutcome>();
	for (const r of rows) if (!byShard.has(r.shard)) byShard.set(r.shard, r);
	const ordered = [...byShard.values()].sort((a, b) => a.start - b.start);
	const out: MergedSweep = { cases: 0, failed: 0, worstProbability: 1, failures: [], engines: { ledger: 0, amplitudes: 0 }, missing: [], phaseReferences: [] };
	let covered = 0;
	for (const r of ordered) {
		if (r.start > covered) out.missing.push({ start: covered, end: r.start });
		covered = Math.max(covered, r.end);
		addSweepPart(out, r, keep);
	}
	if (covered < total) out.missing.push({ start: covered, end: total });
	return out;
}

/** "ledger", "amplitudes" or "ledger+amplitudes": which engines the sweep used. */
export function engineName(e: { ledger: number; amplitudes: number }): string {
	return e.ledger && e.amplitudes ? 'ledger+amplitudes' : e.amplitudes ? 'amplitudes' : 'ledger';
}

/** inputs/s and seconds left, from inputs done since the check started. */
export function rateAndEstimate(done: number, total: number, elapsedMs: number): { inputsPerSecond: number | null; etaSeconds: number | null } {
	if (elapsedMs <= 0 || done <= 0) return { inputsPerSecond: null, etaSeconds: null };
	const rate = (done * 1000) / elapsedMs;
	return { inputsPerSecond: Math.round(rate), etaSeconds: done >= total ? 0 : Math.ceil((total - done) / rate) };
}

/**
 * BullMQ priority of a check's jobs (plan, shards, merge). A job with no priority is taken before
 * every prioritized one (BullMQ guide, "Prioritized"), so what a person asked for (a save, an
 * upload, a push, "check on the server") runs first and the start-up backfill of unchecked
 * versions ('seed') waits behind it instead of sharing its turn.
 */
export const BACKFILL_PRIORITY = 100;
export function jobPriority(reason: CheckReason): { priority?: number } {
	return reason === 'seed' ? { priority: BACKFILL_PRIORITY } : {};
}
