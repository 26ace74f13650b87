// How checks look in JSON (the API, the workbench's status component, the tables). Always `by: "server"`:
// a client's word never becomes a verdict.
import type { CircuitCheckSummary } from '../repositories/circuits';
import type { CheckProgress } from './enqueue';
import type { CheckRow } from './store';

/** pass | fail | running | queued | none; a check that errored or was cancelled gave no verdict: none, with `outcome` saying which. */
export type ListStatus = 'pass' | 'fail' | 'running' | 'queued' | 'none';

export function listStatus(s: CheckRow['status'] | null | undefined): ListStatus {
	return s === 'pass' || s === 'fail' || s === 'running' || s === 'queued' ? s : 'none';
}

/** The `check` field of a circuit in lists. */
export function circuitCheckView(k: CircuitCheckSummary | null) {
	if (!k) return { status: 'none' as const, by: 'server' as const, method: null, cases: 0, finishedAt: null };
	return {
		id: k.id,
		status: listStatus(k.status),
		by: 'server' as const,
		version: k.version,
		method: k.method,
		cases: k.cases,
		failed: k.failed,
		exhaustive: k.exhaustive,
		finishedAt: k.finishedAt ? k.finishedAt.toISOString() : null,
		...(k.status === 'error' || k.status === 'cancelled' ? { outcome: k.status, message: k.message } : {})
	};
}

/** One check in full, with progress when known. */
export function checkView(row: CheckRow, progress: CheckProgress | null) {
	const r = row.result;
	return {
		id: row.id,
		by: 'server' as const,
		circuitId: row.circuit_id,
		version: row.version,
		status: row.status,
		reason: row.reason,
		method: row.method,
		engine: row.engine,
		proofStatus: row.proof_status,
		cases: row.cases,
		failed: row.failed,
		exhaustive: row.exhaustive,
		worstProbability: row.worst_probability,
		inputsTotal: row.inputs_total,
		shardsTotal: row.shards_total,
		durationMs: row.duration_ms,
		workerHost: row.worker_host,
		message: row.message,
		createdAt: row.created_at.toISOString(),
		startedAt: row.started_at?.toISOString() ?? null,
		finishedAt: row.finished_at?.toISOString() ?? null,
		progress,
		specs: r?.specs ?? [],
		assume: r?.assume ?? [],
		inputBits: r?.inputBits ?? null,
		failures: (r?.failures ?? []).slice(0, 5),
		wrongTerms: (r?.wrongTerms ?? []).slice(0, 5),
		notes: r?.notes ?? []
	};
}
export type CheckView = ReturnType<typeof checkView>;
