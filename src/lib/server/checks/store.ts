// The checks tables (migration 20261202053500). Used by the web process (create, read, cancel) and
// by the workers (start, shard rows, verdict). Relative imports only (the worker runs under tsx).
import type { Knex } from 'knex';
import { newId } from '../ids';
import type { ShardOutcome } from './plan';

export type CheckStatus = 'queued' | 'running' | 'pass' | 'fail' | 'error' | 'cancelled';
export type CheckReason = 'save' | 'create' | 'upload' | 'push' | 'seed' | 'request';

export interface CheckRow {
	id: string;
	team_id: string;
	circuit_id: string;
	circuit_version_id: string;
	version: number;
	requested_by: string | null;
	reason: CheckReason;
	status: CheckStatus;
	method: string | null;
	engine: string | null;
	proof_status: string | null;
	inputs_total: number;
	cases: number;
	failed: number;
	exhaustive: boolean;
	worst_probability: number | null;
	shards_total: number;
	duration_ms: number | null;
	worker_host: string | null;
	message: string | null;
	result: CheckResult | null;
	cancelled_by: string | null;
	created_at: Date;
	started_at: Date | null;
	finished_at: Date | null;
}

/** The part of the report without columns of its own. */
export interface CheckResult {
	specs: string[];
	assume: string[];
	inputBits: number;
	inputRegisters: string[];
	engines: { ledger: number; amplitudes: number };
	failures: unknown[];
	wrongTerms: unknown[];
	suspects: unknown[];
	proof: { status: string; reason: string | null; termsChecked: number };
	notes: string[];
}

const FINISHED: CheckStatus[] = ['pass', 'fail', 'error', 'cancelled'];
export const isFinished = (s: CheckStatus) => FINISHED.includes(s);

function readRow(row: Record<string, unknown> | undefined): CheckRow | undefined {
	if (!row) return undefined;
	const r = row as unknown as CheckRow;
	return {
		...r,
		inputs_total: Number(r.inputs_total),
		cases: Number(r.cases),
		failed: Number(r.failed),
		exhaustive: Boolean(r.exhaustive),
		result: typeof r.result === 'string' ? JSON.parse(r.result) : r.result
	};
}

/** A queued check of a version; the circuit then shows it as its latest. */
export async function createCheck(
	db: Knex,
	p: { teamId: string; circuitId: string; version: number; userId: string | null; reason: CheckReason }
): Promise<CheckRow | null> {
	return db.transaction(async (trx) => {
		const v = await trx('circuit_versions').where({ circuit_id: p.circuitId, version: p.version }).first('id');
		if (!v) return null;
		const id = newId();
		await trx('checks').insert({ id, team_id: p.teamId, circuit_id: p.circuitId, circuit_version_id: v.id, version: p.version, requested_by: p.userId, reason: p.reason });
		await trx('circuits').where({ id: p.circuitId }).update({ check_id: id });
		return readRow(await trx('checks').where({ id }).first())!;
	});
}

export async function findCheck(db: Knex | Knex.Transaction, id: string): Promise<CheckRow | undefined> {
	return readRow(await db('checks').where({ id }).first());
}

export async function findTeamCheck(db: Knex, teamId: string, id: string): Promise<CheckRow | undefined> {
	return readRow(await db('checks').where({ id, team_id: teamId }).first());
}

export async function listCircuitChecks(db: Knex, circuitId: string, limit = 10): Promise<CheckRow[]> {
	const rows = await db('checks').where({ circuit_id: circuitId }).orderBy('created_at', 'desc').limit(limit);
	return rows.map((r: Record<string, unknown>) => readRow(r)!);
}

/** Latest check of each given version of a circuit, newest first. */
export async function latestCheckOfVersion(db: Knex, circuitId: string, version: number): Promise<CheckRow | undefined> {
	return readRow(await db('checks').where({ circuit_id: circuitId, version }).orderBy('created_at', 'desc').first());
}

export type StartOutcome = { started: true; row: CheckRow } | { started: false; why: 'busy' | 'finished' | 'gone' };

/**
 * Move a queued check to running unless its team already runs `limit` checks. The team row is
 * locked for the count, so two workers cannot both take the last slot. A check already running
 * (its worker died and the queue retried the job) starts again without counting against the limit.
 */
export async function startCheck(db: Knex, id: string, limit: number, host: string): Promise<StartOutcome> {
	return db.transaction(async (trx) => {
		const row = readRow(await trx('checks').where({ id }).forUpdate().first());
		if (!row) return { started: false, why: 'gone' } as const;
		if (isFinished(row.status)) return { started: false, why: 'finished' } as const;
		if (row.status === 'queued') {
			await trx('teams').where({ id: row.team_id }).forUpdate().first('id');
			const [{ n }] = await trx('checks').where({ team_id: row.team_id, status: 'running' }).count({ n: '*' });
			if (Number(n) >= limit) return { started: false, why: 'busy' } as const;
		}
		await trx('checks').where({ id }).update({ status: 'running', started_at: row.started_at ?? trx.fn.now(3), worker_host: host });
		return { started: true, row: readRow(await trx('checks').where({ id }).first())! } as const;
	});
}

/** Facts known once the plan ran (domain size, shard count, the proof's outcome). */
export async function recordPlan(db: Knex, id: string, p: { inputsTotal: number; shardsTotal: number; exhaustive: boolean; result: CheckResult }): Promise<void> {
	await db('checks').where({ id }).whereIn('status', ['running']).update({ inputs_total: p.inputsTotal, shards_total: p.shardsTotal, exhaustive: p.exhaustive, result: JSON.stringify(p.result) });
}

/** Idempotent: the first row for (check, shard) stays; a retried shard's second write is ignored. */
export async function recordShard(db: Knex, checkId: string, s: ShardOutcome, host: string, durationMs: number): Promise<void> {
	await db('check_shards')
		.insert({
			check_id: checkId,
			shard: s.shard,
			range_start: s.start,
			range_end: s.end,
			cases: s.cases,
			failed: s.failed,
			worst_probability: s.worstProbability,
			failures: JSON.stringify(s.failures),
			engines: JSON.stringify(s.engines),
			phase_references: JSON.stringify(s.phaseReferences),
			worker_host: host,
			duration_ms: Math.round(durationMs)
		})
		.onConflict(['check_id', 'shard'])
		.ignore();
}

export async function listShards(db: Knex, checkId: string): Promise<(ShardOutcome & { workerHost: string })[]> {
	const rows = await db('check_shards').where({ check_id: checkId }).orderBy('shard');
	const parse = (v: unknown) => (typeof v === 'string' ? JSON.parse(v) : v);
	return rows.map((r: Record<string, unknown>) => ({
		shard: Number(r.shard),
		start: Number(r.range_start),
		end: Number(r.range_end),
		cases: Number(r.cases),
		failed: Number(r.failed),
		worstProbability: Number(r.worst_probability),
		failures: parse(r.failures),
		engines: parse(r.engines),
		phaseReferences: parse(r.phase_references) ?? [],
		workerHost: String(r.worker_host)
	}));
}

export async function countShards(db: Knex, checkId: string): Promise<{ shards: number; cases: number }> {
	const [row] = await db('check_shards').where({ check_id: checkId }).count({ n: '*' }).sum({ c: 'cases' });
	return { shards: Number(row.n), cases: Number(row.c ?? 0) };
}

export interface Verdict {
	status: 'pass' | 'fail' | 'error';
	method: string | null;
	engine: string | null;
	proofStatus: string | null;
	cases: number;
	failed: number;
	exhaustive: boolean;
	worstProbability: number | null;
	message: string | null;
	result: CheckResult | null;
	host: string;
}

/** Write the verdict, only while the check runs (a cancelled check stays cancelled). True when written. */
export async function finishCheck(db: Knex, id: string, v: Verdict): Promise<boolean> {
	const row = await findCheck(db, id);
	if (!row) return false;
	const started = row.started_at ? row.started_at.getTime() : Date.now();
	const n = await db('checks')
		.where({ id })
		.whereIn('status', ['queued', 'running'])
		.update({
			status: v.status,
			method: v.method,
			engine: v.engine,
			proof_status: v.proofStatus,
			cases: v.cases,
			failed: v.failed,
			exhaustive: v.exhaustive,
			worst_probability: v.worstProbability,
			message: v.message?.slice(0, 500) ?? null,
			...(v.result ? { result: JSON.stringify(v.result) } : {}),
			worker_host: v.host.slice(0, 255),
			duration_ms: Math.max(0, Date.now() - started),
			finished_at: db.fn.now(3)
		});
	return n > 0;
}

/** Cancel a queued or running check. False when it had already finished. */
export async function cancelCheck(db: Knex, id: string, userId: string): Promise<boolean> {
	const n = await db('checks')
		.where({ id })
		.whereIn('status', ['queued', 'running'])
		.update({ status: 'cancelled', cancelled_by: userId, message: 'cancelled', finished_at: db.fn.now(3) });
	return n > 0;
}
