import type { Knex } from 'knex';
import type { Db } from '../db';
import { newId, sha256 } from '../ids';
import { serializeCircuitDocument } from '$lib/quantum/schema';
import type { CircuitDocument } from '$lib/quantum/circuit';
import { lowerCircuit } from '$lib/quantum/lower';

export type CircuitRow = {
	id: string;
	team_id: string;
	title: string;
	created_by: string | null;
	latest_version: number;
	register_summary: string;
	gate_count: number;
	last_check_status: 'pass' | 'fail' | 'error' | null;
	last_check_summary: string | null;
	last_checked_at: Date | null;
	created_at: Date;
	updated_at: Date;
};

export type CircuitListRow = CircuitRow & { author_name: string | null };

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

/** Most gates the server lowers just to count them (a save must not start unbounded work). */
export const MAX_COUNTED_GATES = 1_000_000;
/** Most block calls expanded for that count (calls that make no gate are work too). */
export const MAX_COUNTED_CALLS = 20_000;

/** Gate count after lowering; 0 when the document does not lower or is past the bound (the workbench says why). */
export function countLoweredGates(doc: CircuitDocument): number {
	try {
		return lowerCircuit(doc, { limits: { maxGates: MAX_COUNTED_GATES, maxCalls: MAX_COUNTED_CALLS } }).gateCount;
	} catch {
		return 0;
	}
}

function readDocument(raw: unknown): CircuitDocument {
	return (typeof raw === 'string' ? JSON.parse(raw) : raw) as CircuitDocument;
}

export async function listCircuits(db: Db, teamId: string): Promise<CircuitListRow[]> {
	return db('circuits as c')
		.leftJoin('users as u', 'u.id', 'c.created_by')
		.where('c.team_id', teamId)
		.orderBy('c.updated_at', 'desc')
		.select('c.*', 'u.name as author_name');
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
	message = 'created'
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
			gate_count: countLoweredGates(doc)
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
	message = ''
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
			gate_count: countLoweredGates(doc),
			updated_at: trx.fn.now(3)
		});
		await trx('audit_log').insert({ actor_id: userId, team_id: row.team_id, action: 'circuit.save', subject_type: 'circuit', subject_id: circuitId, detail: JSON.stringify({ version }) });
		return version;
	});
}

export async function deleteCircuit(db: Knex, teamId: string, circuitId: string, userId: string): Promise<boolean> {
	return db.transaction(async (trx) => {
		const n = await trx('circuits').where({ id: circuitId, team_id: teamId }).delete();
		if (n) await trx('audit_log').insert({ actor_id: userId, team_id: teamId, action: 'circuit.delete', subject_type: 'circuit', subject_id: circuitId });
		return n > 0;
	});
}

export async function recordCheck(db: Db, circuitId: string, status: 'pass' | 'fail' | 'error', summary: string): Promise<void> {
	await db('circuits').where({ id: circuitId }).update({ last_check_status: status, last_check_summary: summary.slice(0, 255), last_checked_at: db.fn.now(3) });
}
