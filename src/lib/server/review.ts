import { error, isHttpError } from '@sveltejs/kit';
import { db } from './db';
import { sha256 } from './ids';
import type { TeamAccess } from './guard';
import { checkSnapshot } from './png';
import { boardAt, readPostedDocument, traceSummary } from './heavy';
import { createCircuit, findCircuit, findVersion, saveVersion, StaleVersionError } from './repositories/circuits';
import { findTrace, insertTrace } from './repositories/traces';
import { createReport, findReport, ReportConflict, setReportBoard } from './repositories/reports';
import { notifyReportOpened } from './report-mail';
import { enqueueIfSpecified } from './checks/enqueue';
import { listBreakpoints } from './repositories/breakpoints';
import { listMembers } from './repositories/teams';
import { can } from '$lib/permissions';
import { serializeCircuitDocument } from '$lib/quantum/schema';
import { createReportSchema, MAX_SNAPSHOT_BYTES, type CreateReportInput } from '$lib/schemas/review';
import type { z } from 'zod';
import type { createTraceSchema } from '$lib/schemas/review';

// What the JSON API and the pages share for traces and reports: resolving the circuit version a
// trace refers to, running it on the server when no summary came with it, and opening a report
// (with its snapshot) and mailing the people it names.

type CreateTrace = z.infer<typeof createTraceSchema>;


/**
 * The circuit version a trace refers to. From the command line the target is explicit: a
 * circuitId with the version the document was edited from (a newer latest is refused, naming
 * both, unless `force`), or no circuitId for a new circuit. A circuit is never found by title.
 */
async function resolveVersion(access: TeamAccess, body: CreateTrace) {
	if (body.circuitId && body.version && body.document === undefined) {
		const circuit = await findCircuit(db, access.team.id, body.circuitId);
		if (!circuit) error(404, { message: 'No such circuit in this team.', code: 'not_found' });
		const version = await findVersion(db, circuit.id, body.version);
		if (!version) error(404, { message: `This circuit has no version ${body.version}.`, code: 'not_found' });
		return { circuit, version, added: false };
	}
	// Validated and sized in the worker pool (a document whose calls nest past the workbench's limit is refused with its path).
	const parsed = await readPostedDocument({ json: body.document }, "Checking the trace's circuit");
	if (!parsed.ok) error(parsed.status === 400 ? 422 : parsed.status, { message: `The circuit document is not valid: ${parsed.message}`, code: 'bad_request' });
	const doc = parsed.ok ? parsed.document : (null as never);
	const gateCount = parsed.ok ? parsed.gateCount : 0;
	if (!body.circuitId) {
		// A trace makes a circuit only for a member who may edit circuits (trace.create is the same roles today).
		if (!can(access.role, 'circuit.edit')) error(403, { message: 'Your role in this team does not allow this.', code: 'forbidden' });
		if (body.newTitle) doc.title = body.newTitle;
		const made = await createCircuit(db, access.team.id, access.user.id, doc, 'pushed from the command line', gateCount);
		return { circuit: made.circuit, version: (await findVersion(db, made.circuit.id, made.version))!, added: true };
	}
	if (!can(access.role, 'circuit.edit')) error(403, { message: 'Your role in this team does not allow this.', code: 'forbidden' });
	const circuit = await findCircuit(db, access.team.id, body.circuitId);
	if (!circuit) error(404, { message: 'No such circuit in this team.', code: 'not_found' });
	// A pushed file keeps the circuit's title (an imported QASM file's title is only its file name).
	doc.title = circuit.title;
	const latest = (await findVersion(db, circuit.id, circuit.latest_version))!;
	// The same document as the latest version: nothing to add, the trace refers to it.
	if (latest.hash === sha256(serializeCircuitDocument(doc))) return { circuit, version: latest, added: false };
	const base = body.force ? circuit.latest_version : body.baseVersion!;
	if (base > circuit.latest_version) error(409, { message: `"${circuit.title}" has no version ${base} yet (its latest is version ${circuit.latest_version}).`, code: 'conflict' });
	const stale = (latestNow: number): never =>
		error(409, {
			message: `"${circuit.title}" is at version ${latestNow}, but your file is based on version ${base}. Someone saved a newer version since: export version ${latestNow}, merge, and push again (or push with --force to add yours on top of version ${latestNow}).`,
			code: 'conflict'
		});
	if (base !== circuit.latest_version) stale(circuit.latest_version);
	let number: number;
	try {
		number = await saveVersion(db, circuit.id, base, access.user.id, doc, body.force ? 'pushed from the command line (forced)' : 'pushed from the command line', gateCount);
	} catch (e) {
		if (e instanceof StaleVersionError) stale(e.latest);
		throw e;
	}
	return { circuit: (await findCircuit(db, access.team.id, circuit.id))!, version: (await findVersion(db, circuit.id, number!))!, added: true };
}

export type SavedTrace = {
	id: string;
	computedBy: 'browser' | 'server';
	circuitId: string;
	version: number;
	/** True when this upload added the version (a push of a changed document). */
	addedVersion: boolean;
	firstDivergence: { step: number; qubit: number; label: string; message: string } | null;
	lastStep: number;
};

/** Save a trace; returns its id, its version, whether the server computed the summary, and its first divergence. */
export async function saveTrace(access: TeamAccess, body: CreateTrace): Promise<SavedTrace> {
	const { circuit, version, added } = await resolveVersion(access, body);
	// Every push (a trace carrying its document) queues a server check of the version it pushed or matched.
	if (body.document !== undefined) await enqueueIfSpecified(db, version.document, { teamId: access.team.id, circuitId: circuit.id, version: version.version, userId: access.user.id, reason: 'push' });
	const inputs = { values: body.inputs.values, superposed: body.inputs.superposed };
	const summary = body.summary ?? (await traceSummary(version.document, inputs));
	const computedBy = body.summary ? 'browser' : 'server';
	const id = await insertTrace(db, { teamId: access.team.id, circuitId: circuit.id, versionId: version.id, version: version.version, authorId: access.user.id, label: body.label, inputs, summary, computedBy });
	return { id, computedBy, circuitId: circuit.id, version: version.version, addedVersion: added, firstDivergence: summary.firstDivergence, lastStep: summary.lastStep };
}

/** Read a report from JSON or from multipart (`report` as JSON text plus an optional `snapshot` file). */
/** Room next to the snapshot for the report's text and for base64 (a 5 MiB snapshot is 6.7 MiB in JSON): 8 MiB in all, BODY_SIZE_LIMIT. */
const MAX_REPORT_TEXT_BYTES = 3 * 1024 * 1024;

export async function readReportRequest(request: Request): Promise<{ input: CreateReportInput; snapshot: Uint8Array | null }> {
	const type = request.headers.get('content-type') ?? '';
	let raw: unknown;
	let snapshot: Uint8Array | null = null;
	// Too large is 413, said before reading: the snapshot limit plus room for the report's text.
	const declared = Number(request.headers.get('content-length') ?? 0);
	const tooLarge = (bytes: number | null): never =>
		error(413, {
			message: `The upload is ${bytes === null ? 'larger than the server reads' : `${(bytes / 2 ** 20).toFixed(1)} MiB`}; a snapshot may be at most ${(MAX_SNAPSHOT_BYTES / 2 ** 20).toFixed(1)} MiB. Capture a smaller area or zoom out.`,
			code: 'bad_request'
		});
	if (declared > MAX_SNAPSHOT_BYTES + MAX_REPORT_TEXT_BYTES) tooLarge(declared);
	if (type.startsWith('multipart/form-data')) {
		let overLimit = false;
		const form = await request.formData().catch((e: unknown) => {
			// adapter-node stops reading past BODY_SIZE_LIMIT with a 413 of its own.
			if ((e as { status?: number } | null)?.status === 413) overLimit = true;
			return null;
		});
		if (overLimit) tooLarge(null);
		if (!form) error(400, { message: 'The upload could not be read as a form.', code: 'bad_request' });
		const text = form.get('report');
		if (typeof text !== 'string') error(400, { message: 'The form has no "report" field (the report as JSON).', code: 'bad_request' });
		try {
			raw = JSON.parse(text);
		} catch {
			error(400, { message: 'The "report" field is not valid JSON.', code: 'bad_request' });
		}
		const file = form.get('snapshot');
		if (file instanceof File && file.size > 0) {
			if (file.size > MAX_SNAPSHOT_BYTES) checkSnapshot(new Uint8Array(file.size)); // answers 413 with the sizes
			snapshot = new Uint8Array(await file.arrayBuffer());
		}
	} else {
		try {
			raw = await request.json();
		} catch {
			error(400, { message: 'Send a JSON body, or multipart with "report" and "snapshot".', code: 'bad_request' });
		}
		const b64 = (raw as { snapshotBase64?: unknown } | null)?.snapshotBase64;
		if (typeof b64 === 'string' && b64.length) snapshot = new Uint8Array(Buffer.from(b64, 'base64'));
	}
	const parsed = createReportSchema.safeParse(raw);
	if (!parsed.success) error(400, { message: parsed.error.issues.map((i) => `${i.path.join('.') || 'body'}: ${i.message}`).join('; '), code: 'bad_request' });
	return { input: parsed.data, snapshot };
}

/**
 * Draw the dial board at the report's step on the server (SVG) with its ledger excerpt, from a
 * fresh run of the trace's saved version and inputs. Reports without a snapshot (the command
 * line) open with it. Past the server's run bounds there is no picture, and the page says so.
 */
async function drawReportBoard(teamId: string, reportId: string, traceId: string, step: number, circuitTitle: string): Promise<boolean> {
	const trace = await findTrace(db, teamId, traceId);
	if (!trace) return false;
	const version = await findVersion(db, trace.circuit_id, trace.version);
	if (!version) return false;
	try {
		const inputs = Object.entries(trace.inputs.values).map(([k, v]) => `${k}=${v}`).join(', ');
		const picture = await boardAt(version.document, trace.inputs, step, [`${circuitTitle} v${trace.version}${inputs ? ` · inputs ${inputs}` : ''}`]);
		await setReportBoard(db, reportId, picture.svg, picture.ledger);
		return true;
	} catch (e) {
		if (isHttpError(e)) return false; // past the server's bounds: the report stands without a picture
		throw e;
	}
}

/** Open a report (snapshot checked by its bytes; a server-drawn board when none) and mail its assignee and reviewer. */
export async function openReport(access: TeamAccess, input: CreateReportInput, snapshotBytes: Uint8Array | null): Promise<{ id: string; mailed: number }> {
	const snapshot = snapshotBytes ? { bytes: snapshotBytes, ...checkSnapshot(snapshotBytes) } : null;
	let id: string;
	try {
		id = await createReport(db, { teamId: access.team.id, authorId: access.user.id, input, snapshot });
	} catch (e) {
		if (e instanceof ReportConflict) error(e.status, { message: e.message, code: e.status === 409 ? 'conflict' : 'bad_request' });
		throw e;
	}
	let r = (await findReport(db, access.team.id, id))!;
	if (!snapshot && (await drawReportBoard(access.team.id, id, r.trace.id, r.step, r.circuit.title))) r = (await findReport(db, access.team.id, id))!;
	const mailed = await notifyReportOpened(db, { team: access.team, actor: access.user, report: r });
	return { id, mailed };
}

/** Map repository conflicts to HTTP answers. */
export function rethrowReportConflict(e: unknown): never {
	if (e instanceof ReportConflict) error(e.status, { message: e.message, code: e.status === 409 ? 'conflict' : 'bad_request' });
	throw e;
}

/** What the workbench's team tab needs on a circuit page: saved breakpoints, members, rights. */
export async function loadTeamReview(access: TeamAccess, versionId: string) {
	return {
		breakpoints: await listBreakpoints(db, access.team.id, versionId),
		members: (await listMembers(db, access.team.id)).map((m) => ({ id: m.user_id, name: m.name, role: m.role })),
		rights: {
			traceCreate: can(access.role, 'trace.create'),
			breakpointCreate: can(access.role, 'breakpoint.create'),
			annotate: can(access.role, 'breakpoint.annotate'),
			reportCreate: can(access.role, 'report.create')
		}
	};
}
