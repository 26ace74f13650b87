import type { Knex } from 'knex';
import type { Db } from '../db';
import { newId, sha256 } from '../ids';
import { deleteReportSnapshots } from './attachments';
import { serializeCircuitDocument } from '$lib/quantum/schema';
import type { CircuitDocument } from '$lib/quantum/circuit';
import { countLoweredGates } from '../gate-count';

export type CircuitRow = {
	id: string;
	team_id: string;
	title: string;
	created_by: string | null;
	latest_version: number;
	register_summary: string;
	gate_count: number;
	/** The latest server check (table checks); the verdict is the worker's, never a client's. */
	check_id: string | null;
	created_at: Date;
	updated_at: Date;
};

/** The latest server check of a circuit, as lists show it. */
export type CircuitCheckSummary = {
	id: string;
	version: number;
	status: 'queued' | 'running' | 'pass' | 'fail' | 'error' | 'cancelled';
	method: string | null;
	cases: number;
	failed: number;
	exhaustive: boolean;
	message: string | null;
	finishedAt: Date | null;
};

export type CircuitListRow = CircuitRow & { author_name: string | null; check: CircuitCheckSummary | null };

export type CircuitVersionRow = {
	id: string;
	circuit_id: string;
	version: number;
	document: CircuitDocument;
	hash: string;
	message: string;
	created_by: string | null;
	created_at: Date;
};

/** Thrown when a save's base version is no longer the latest. */
export class StaleVersionError extends Error {
	constructor(
		readonly base: number,
		readonly latest: number
	) {
		super(`This circuit was saved as version ${latest} while you were editing version ${base}.`);
	}
}

/** "a[4] b[4] p[8]" — what the circuits table shows. */
export function summarizeRegisters(doc: CircuitDocument): string {
	return doc.registers.map((r) => `${r.name}[${r.size}]`).join(' ').slice(0, 255);
}

export { countLoweredGates, MAX_COUNTED_CALLS, MAX_COUNTED_GATES } from '../gate-count';

function readDocument(raw: unknown): CircuitDocument {
	return (typeof raw === 'string' ? JSON.parse(raw) : raw) as CircuitDocument;
}

function listQuery(db: Db, teamId: string) {
	return db('circuits as c')
		.leftJoin('users as u', 'u.id', 'c.created_by')
		.leftJoin('checks as k', 'k.id', 'c.check_id')
		.where('c.team_id', teamId)
		.select(
			'c.*',
			'u.name as author_name',
			'k.version as k_version',
			'k.status as k_status',
			'k.method as k_method',
			'k.cases as k_cases',
			'k.failed as k_failed',
			'k.exhaustive as k_exhaustive',
			'k.message as k_message',
			'k.finished_at as k_finished_at'
		);
}

function readListRow(r: Record<string, unknown>): CircuitListRow {
	const { k_version, k_status, k_method, k_cases, k_failed, k_exhaustive, k_message, k_finished_at, ...rest } = r;
	const row = rest as unknown as CircuitListRow;
	row.check = row.check_id
		? {
				id: row.check_id,
				version: Number(k_version),
				status: k_status as CircuitCheckSummary['status'],
				method: (k_method as string | null) ?? null,
				cases: Number(k_cases),
				failed: Number(k_failed),
				exhaustive: Boolean(k_exhaustive),
				message: (k_message as string | null) ?? null,
				finishedAt: (k_finished_at as Date | null) ?? null
			}
		: null;
	return row;
}

export async function listCircuits(db: Db, teamId: string): Promise<CircuitListRow[]> {
	const rows = await listQuery(db, teamId).orderBy('c.updated_at', 'desc');
	return rows.map(readListRow);
}

/** One page, newest change first (the JSON list). */
export async function listCircuitsPage(db: Db, teamId: string, page: number, perPage: number): Promise<{ rows: CircuitListRow[]; total: number }> {
	const [{ n }] = await db('circuits').where({ team_id: teamId }).count({ n: '*' });
	const rows = await listQuery(db, teamId)
		.orderBy([{ column: 'c.updated_at', order: 'desc' }, { column: 'c.id' }])
		.limit(perPage)
		.offset((page - 1) * perPage);
	return { rows: rows.map(readListRow), total: Number(n) };
}

export async function findCircuit(db: Db, teamId: string, id: string): Promise<CircuitRow | undefined> {
	return db<CircuitRow>('circuits').where({ team_id: teamId, id }).first();
}

export async function findVersion(db: Db, circuitId: string, version: number): Promise<CircuitVersionRow | undefined> {
	const row = await db('circuit_versions').where({ circuit_id: circuitId, version }).first();
	return row ? { ...row, document: readDocument(row.document) } : undefined;
}

export async function listVersions(db: Db, circuitId: string): Promise<Omit<CircuitVersionRow, 'document'>[]> {
	return db('circuit_versions as v')
		.where('v.circuit_id', circuitId)
		.orderBy('v.version', 'desc')
		.select('v.id', 'v.circuit_id', 'v.version', 'v.hash', 'v.message', 'v.created_by', 'v.created_at');
}

/** Create a circuit with its version 1. */
export async function createCircuit(
	db: Knex,
	teamId: string,
	userId: string,
	doc: CircuitDocument,
	message = 'created',
	/** Counted by the caller in the worker pool (requests); counted here when absent (seeds, tests). */
	gateCount?: number
): Promise<{ circuit: CircuitRow; version: number }> {
	return db.transaction(async (trx) => {
		const id = newId();
		const text = serializeCircuitDocument(doc);
		await trx('circuits').insert({
			id,
			team_id: teamId,
			title: doc.title.slice(0, 120),
			created_by: userId,
			latest_version: 1,
			register_summary: summarizeRegisters(doc),
			gate_count: gateCount ?? countLoweredGates(doc)
		});
		await trx('circuit_versions').insert({
			id: newId(),
			circuit_id: id,
			version: 1,
			document: text,
			hash: sha256(text),
			message: message.slice(0, 255),
			created_by: userId
		});
		await trx('audit_log').insert({ actor_id: userId, team_id: teamId, action: 'circuit.create', subject_type: 'circuit', subject_id: id });
		const circuit = (await trx<CircuitRow>('circuits').where({ id }).first())!;
		return { circuit, version: 1 };
	});
}

/**
 * Save `doc` as version base+1. The row lock makes two saves from the same base race safely:
 * the second sees latest > base and gets StaleVersionError, never a silent overwrite.
 */
export async function saveVersion(
	db: Knex,
	circuitId: string,
	base: number,
	userId: string,
	doc: CircuitDocument,
	message = '',
	/** Counted by the caller in the worker pool (requests); counted here when absent (seeds, tests). */
	gateCount?: number
): Promise<number> {
	return db.transaction(async (trx) => {
		const row = await trx<CircuitRow>('circuits').where({ id: circuitId }).forUpdate().first();
		if (!row) throw new Error('circuit vanished');
		if (row.latest_version !== base) throw new StaleVersionError(base, row.latest_version);
		const version = base + 1;
		const text = serializeCircuitDocument(doc);
		await trx('circuit_versions').insert({
			id: newId(),
			circuit_id: circuitId,
			version,
			document: text,
			hash: sha256(text),
			message: message.slice(0, 255),
			created_by: userId
		});
		await trx('circuits').where({ id: circuitId }).update({
			latest_version: version,
			title: doc.title.slice(0, 120),
			register_summary: summarizeRegisters(doc),
			gate_count: gateCount ?? countLoweredGates(doc),
			updated_at: trx.fn.now(3)
		});
		await trx('audit_log').insert({ actor_id: userId, team_id: row.team_id, action: 'circuit.save', subject_type: 'circuit', subject_id: circuitId, detail: JSON.stringify({ version }) });
		return version;
	});
}

export async function deleteCircuit(db: Knex, teamId: string, circuitId: string, userId: string): Promise<boolean> {
	return db.transaction(async (trx) => {
		await deleteReportSnapshots(trx, teamId, { circuit_id: circuitId });
		const n = await trx('circuits').where({ id: circuitId, team_id: teamId }).delete();
		if (n) await trx('audit_log').insert({ actor_id: userId, team_id: teamId, action: 'circuit.delete', subject_type: 'circuit', subject_id: circuitId });
		return n > 0;
	});
}
