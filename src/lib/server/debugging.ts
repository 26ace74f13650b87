import { error } from '@sveltejs/kit';
import { db } from './db';
import { sha256 } from './ids';
import type { TeamAccess } from './guard';
import { checkSnapshot } from './png';
import { computeTraceSummary } from './trace-compute';
import { createCircuit, findCircuit, findVersion, saveVersion } from './repositories/circuits';
import { insertTrace } from './repositories/traces';
import { createReport, findReport, ReportConflict } from './repositories/reports';
import { notifyReportPeople } from './report-mail';
import { listBreakpoints } from './repositories/breakpoints';
import { listMembers } from './repositories/teams';
import { can } from '$lib/permissions';
import { parseCircuitDocument, serializeCircuitDocument } from '$lib/quantum/schema';
import { createReportSchema, MAX_SNAPSHOT_BYTES, type CreateReportInput } from '$lib/schemas/debugging';
import type { z } from 'zod';
import type { createTraceSchema } from '$lib/schemas/debugging';

// What the JSON API and the pages share for traces and reports: resolving the circuit version a
// trace refers to, running it on the server when no summary came with it, and opening a report
// (with its snapshot) and mailing the people it names.

type CreateTrace = z.infer<typeof createTraceSchema>;

const unprocessable = (message: string): never => error(422, { message, code: 'bad_request' });

/** The circuit version a trace refers to; from the command line, found by title or made. */
async function resolveVersion(access: TeamAccess, body: CreateTrace) {
	if (body.circuitId && body.version) {
		const circuit = await findCircuit(db, access.team.id, body.circuitId);
		if (!circuit) error(404, { message: 'No such circuit in this team.', code: 'not_found' });
		const version = await findVersion(db, circuit.id, body.version);
		if (!version) error(404, { message: `This circuit has no version ${body.version}.`, code: 'not_found' });
		return { circuit, version };
	}
	const parsed = parseCircuitDocument(body.document);
	if (!parsed.ok) unprocessable(`The circuit document is not valid: ${parsed.issues.slice(0, 5).map((i) => `${i.path}: ${i.message}`).join('; ')}`);
	const doc = parsed.ok ? parsed.document : (null as never);
	const text = serializeCircuitDocument(doc);
	const existing = await db('circuits').where({ team_id: access.team.id, title: doc.title.slice(0, 120) }).orderBy('created_at', 'asc').first('id');
	let circuitId: string;
	let number: number;
	if (!existing) {
		const made = await createCircuit(db, access.team.id, access.user.id, doc, 'uploaded with a trace');
		circuitId = made.circuit.id;
		number = made.version;
	} else {
		circuitId = existing.id;
		const latest = (await findCircuit(db, access.team.id, circuitId))!;
		const v = await findVersion(db, circuitId, latest.latest_version);
		number = v && v.hash === sha256(text) ? v.version : await saveVersion(db, circuitId, latest.latest_version, access.user.id, doc, 'uploaded with a trace');
	}
	const circuit = (await findCircuit(db, access.team.id, circuitId))!;
	return { circuit, version: (await findVersion(db, circuitId, number))! };
}

/** Save a trace; returns its id and whether the server computed the summary. */
export async function saveTrace(access: TeamAccess, body: CreateTrace): Promise<{ id: string; computedBy: 'browser' | 'server'; circuitId: string; version: number }> {
	const { circuit, version } = await resolveVersion(access, body);
	const inputs = { values: body.inputs.values, superposed: body.inputs.superposed };
	const summary = body.summary ?? computeTraceSummary(version.document, inputs);
	const computedBy = body.summary ? 'browser' : 'server';
	const id = await insertTrace(db, { teamId: access.team.id, circuitId: circuit.id, versionId: version.id, version: version.version, authorId: access.user.id, label: body.label, inputs, summary, computedBy });
	return { id, computedBy, circuitId: circuit.id, version: version.version };
}

/** Read a report from JSON or from multipart (`report` as JSON text plus an optional `snapshot` file). */
export async function readReportRequest(request: Request): Promise<{ input: CreateReportInput; snapshot: Uint8Array | null }> {
	const type = request.headers.get('content-type') ?? '';
	let raw: unknown;
	let snapshot: Uint8Array | null = null;
	if (type.startsWith('multipart/form-data')) {
		const form = await request.formData().catch(() => null);
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

/** Open a report (snapshot checked by its bytes) and mail its assignee and reviewer. */
export async function openReport(access: TeamAccess, input: CreateReportInput, snapshotBytes: Uint8Array | null): Promise<{ id: string; mailed: number }> {
	const snapshot = snapshotBytes ? { bytes: snapshotBytes, ...checkSnapshot(snapshotBytes) } : null;
	let id: string;
	try {
		id = await createReport(db, { teamId: access.team.id, authorId: access.user.id, input, snapshot });
	} catch (e) {
		if (e instanceof ReportConflict) error(e.status, { message: e.message, code: e.status === 409 ? 'conflict' : 'bad_request' });
		throw e;
	}
	const r = (await findReport(db, access.team.id, id))!;
	const people: { part: 'assignee' | 'reviewer'; email: string; name: string }[] = [];
	if (r.assignee?.email) people.push({ part: 'assignee', email: r.assignee.email, name: r.assignee.name });
	if (r.reviewer?.email) people.push({ part: 'reviewer', email: r.reviewer.email, name: r.reviewer.name });
	const mailed = await notifyReportPeople({
		people,
		authorName: access.user.name,
		teamName: access.team.name,
		teamSlug: access.team.slug,
		reportId: id,
		traceId: r.trace.id,
		step: r.step,
		title: r.title,
		circuitTitle: r.circuit.title,
		severity: r.severity
	});
	return { id, mailed };
}

/** Map repository conflicts to HTTP answers. */
export function rethrowReportConflict(e: unknown): never {
	if (e instanceof ReportConflict) error(e.status, { message: e.message, code: e.status === 409 ? 'conflict' : 'bad_request' });
	throw e;
}

/** What the workbench's team tab needs on a circuit page: saved breakpoints, members, rights. */
export async function loadTeamDebug(access: TeamAccess, versionId: string) {
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
