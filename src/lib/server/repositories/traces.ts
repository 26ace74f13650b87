import type { Db } from '../db';
import { newId } from '../ids';
import { deleteReportSnapshots } from './attachments';
import type { TraceQuery, TraceSummaryInput } from '$lib/schemas/review';

export type TraceRow = {
	id: string;
	team_id: string;
	circuit_id: string;
	circuit_version_id: string;
	version: number;
	author_id: string | null;
	label: string;
	engine: 'ledger' | 'amplitudes';
	inputs: { values: Record<string, string>; superposed: string[] };
	summary: TraceSummaryInput;
	diverged: boolean;
	divergence_step: number | null;
	divergence_qubit: number | null;
	divergence_label: string | null;
	gate_count: number;
	last_step: number;
	keyframe_checksums: { step: number; checksum: string }[];
	computed_by: 'browser' | 'server';
	created_at: Date;
	circuit_title: string;
	author_name: string | null;
};

const json = <T>(v: unknown): T => (typeof v === 'string' ? (JSON.parse(v) as T) : (v as T));

function fromDb(r: Record<string, unknown>): TraceRow {
	return {
		...(r as TraceRow),
		diverged: Boolean(r.diverged),
		inputs: json(r.inputs),
		summary: json(r.summary),
		keyframe_checksums: json(r.keyframe_checksums)
	};
}

export type NewTrace = {
	teamId: string;
	circuitId: string;
	versionId: string;
	version: number;
	authorId: string;
	label: string;
	inputs: { values: Record<string, string>; superposed: string[] };
	summary: TraceSummaryInput;
	computedBy: 'browser' | 'server';
};

export async function insertTrace(db: Db, t: NewTrace): Promise<string> {
	const id = newId();
	const d = t.summary.firstDivergence;
	await db('traces').insert({
		id,
		team_id: t.teamId,
		circuit_id: t.circuitId,
		circuit_version_id: t.versionId,
		version: t.version,
		author_id: t.authorId,
		label: t.label.slice(0, 160),
		engine: t.summary.engine,
		inputs: JSON.stringify(t.inputs),
		summary: JSON.stringify({ ...t.summary, keyframeChecksums: undefined }),
		diverged: d !== null,
		divergence_step: d?.step ?? null,
		divergence_qubit: d?.qubit ?? null,
		divergence_label: d?.label.slice(0, 80) ?? null,
		gate_count: t.summary.gateCount,
		last_step: t.summary.lastStep,
		keyframe_checksums: JSON.stringify(t.summary.keyframeChecksums),
		computed_by: t.computedBy,
		created_at: new Date()
	});
	await db('audit_log').insert({ actor_id: t.authorId, team_id: t.teamId, action: 'trace.create', subject_type: 'trace', subject_id: id });
	return id;
}

function base(db: Db) {
	return db('traces as t').join('circuits as c', 'c.id', 't.circuit_id').leftJoin('users as u', 'u.id', 't.author_id');
}

export async function findTrace(db: Db, teamId: string, id: string): Promise<TraceRow | undefined> {
	const r = await base(db).where({ 't.team_id': teamId, 't.id': id }).first('t.*', 'c.title as circuit_title', 'u.name as author_name');
	return r ? fromDb(r) : undefined;
}

const SORTS: Record<TraceQuery['sort'], [string, 'asc' | 'desc'][]> = {
	created_desc: [['t.created_at', 'desc']],
	created_asc: [['t.created_at', 'asc']],
	circuit: [['c.title', 'asc'], ['t.created_at', 'desc']],
	author: [['u.name', 'asc'], ['t.created_at', 'desc']],
	divergence: [['t.diverged', 'desc'], ['t.divergence_step', 'asc'], ['t.created_at', 'desc']]
};

/** One page of a team's traces with the filters of the traces table; newest first by default. */
export async function listTraces(db: Db, teamId: string, q: TraceQuery): Promise<{ rows: Omit<TraceRow, 'summary' | 'keyframe_checksums'>[]; total: number }> {
	const filtered = () => {
		const b = base(db).where('t.team_id', teamId);
		if (q.circuit) b.where('t.circuit_id', q.circuit);
		if (q.author) b.where('t.author_id', q.author);
		if (q.diverged) b.where('t.diverged', q.diverged === 'yes');
		if (q.from) b.where('t.created_at', '>=', new Date(`${q.from}T00:00:00Z`));
		if (q.to) b.where('t.created_at', '<', new Date(new Date(`${q.to}T00:00:00Z`).getTime() + 86_400_000));
		return b;
	};
	const [{ n }] = (await filtered().count({ n: '*' })) as { n: number | string }[];
	const page = filtered()
		.select('t.id', 't.team_id', 't.circuit_id', 't.circuit_version_id', 't.version', 't.author_id', 't.label', 't.engine', 't.inputs', 't.diverged', 't.divergence_step', 't.divergence_qubit', 't.divergence_label', 't.gate_count', 't.last_step', 't.computed_by', 't.created_at', 'c.title as circuit_title', 'u.name as author_name')
		.limit(q.perPage)
		.offset((q.page - 1) * q.perPage);
	for (const [col, dir] of SORTS[q.sort]) page.orderBy(col, dir);
	page.orderBy('t.id', 'asc');
	const rows = (await page).map((r: Record<string, unknown>) => ({ ...(r as TraceRow), diverged: Boolean(r.diverged), inputs: json<TraceRow['inputs']>(r.inputs) }));
	return { rows, total: Number(n) };
}

/** The trace, its reports (by cascade) with their snapshots, and the audit entry, in one transaction. */
export async function deleteTrace(db: Db, teamId: string, id: string, actorId: string): Promise<boolean> {
	return db.transaction(async (trx) => {
		await deleteReportSnapshots(trx, teamId, { trace_id: id });
		const n = await trx('traces').where({ team_id: teamId, id }).delete();
		if (n) await trx('audit_log').insert({ actor_id: actorId, team_id: teamId, action: 'trace.delete', subject_type: 'trace', subject_id: id });
		return n > 0;
	});
}

/** The JSON shape of a trace in the API (and in page data). */
export function traceView(t: TraceRow | Omit<TraceRow, 'summary' | 'keyframe_checksums'>, full: boolean) {
	const v = {
		id: t.id,
		circuit: { id: t.circuit_id, title: t.circuit_title, version: t.version, versionId: t.circuit_version_id },
		author: t.author_id ? { id: t.author_id, name: t.author_name ?? '' } : null,
		label: t.label,
		engine: t.engine,
		inputs: t.inputs,
		diverged: t.diverged,
		firstDivergence: t.divergence_step === null ? null : { step: t.divergence_step, qubit: t.divergence_qubit, label: t.divergence_label },
		gateCount: t.gate_count,
		lastStep: t.last_step,
		computedBy: t.computed_by,
		createdAt: t.created_at.toISOString()
	};
	if (!full || !('summary' in t)) return v;
	return { ...v, summary: t.summary, keyframeChecksums: t.keyframe_checksums };
}
