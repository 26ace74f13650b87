import { z } from 'zod';
import { REPORT_STATUSES, SEVERITIES } from '$lib/review/reports';

// Payloads of traces, breakpoints, comments and reports, shared by the workbench, the pages'
// form actions, the JSON API and the command line. No server imports.

const id24 = z.string().regex(/^[a-z2-7]{24}$/, 'Not an id.');
const checksum = z.object({ step: z.number().int().min(0), checksum: z.string().regex(/^[0-9a-f]{8}$/, 'An 8-digit hex checksum.') });

export const traceInputsSchema = z.object({
	values: z.record(z.string().max(64), z.string().max(1100)).default({}),
	superposed: z.array(z.string().max(64)).max(64).default([])
});

/** The summary a browser sends with a trace (its worker computed it). */
export const traceSummarySchema = z.object({
	engine: z.enum(['ledger', 'amplitudes']),
	gateCount: z.number().int().min(0),
	lastStep: z.number().int().min(0),
	qubitCount: z.number().int().min(0),
	registerValues: z.record(z.string(), z.string().nullable()),
	distributions: z.record(z.string(), z.array(z.number())).default({}),
	firstDivergence: z.object({ step: z.number().int().min(0), qubit: z.number().int().min(0), label: z.string().max(80), message: z.string().max(1000) }).nullable(),
	divergenceCount: z.number().int().min(0),
	handover: z.object({ step: z.number().int(), reason: z.string().max(500) }).nullable().default(null),
	stopped: z.object({ step: z.number().int(), reason: z.string().max(500) }).nullable().default(null),
	keyframeChecksums: z.array(checksum).max(100_000)
});
export type TraceSummaryInput = z.infer<typeof traceSummarySchema>;

/**
 * POST /api/teams/{slug}/traces. Either a saved circuit version (`circuitId` + `version`) or a
 * whole `document` (the command line: the server finds the circuit by title or makes it, and
 * saves a new version when the document changed). Without `summary` the server runs it.
 */
export const createTraceSchema = z
	.object({
		circuitId: id24.optional(),
		version: z.number().int().min(1).optional(),
		document: z.unknown().optional(),
		/** With document + circuitId: the version the document was edited from (a later latest is refused unless force). */
		baseVersion: z.number().int().min(1).optional(),
		force: z.boolean().default(false),
		/** With document and no circuitId: the new circuit's title (default: the document's). */
		newTitle: z.string().trim().min(1).max(120).optional(),
		label: z.string().trim().max(160).default(''),
		inputs: traceInputsSchema.default({ values: {}, superposed: [] }),
		summary: traceSummarySchema.optional()
	})
	.refine((v) => (v.circuitId && v.version) || v.document !== undefined, { message: 'Send circuitId and version, or a document.' })
	.refine((v) => !(v.newTitle && v.circuitId), { message: 'Send circuitId (add a version) or newTitle (a new circuit), not both.' })
	.refine((v) => !(v.document !== undefined && v.circuitId && v.baseVersion === undefined && !v.force), { message: 'With a document for an existing circuit, send baseVersion (the version it was edited from), or force: true.', path: ['baseVersion'] });

const specBase = { note: z.string().max(4000).default('') };
export const breakpointSpecSchema = z.discriminatedUnion('kind', [
	z.object({ kind: z.literal('gate'), gate: z.number().int().min(0), ...specBase }),
	z.object({ kind: z.literal('block'), itemId: z.string().min(1).max(120), at: z.enum(['start', 'end']), ...specBase }),
	z.object({ kind: z.literal('divergence'), qubit: z.number().int().min(0).nullable(), tolerance: z.number().min(0).max(0.5), ...specBase }),
	z.object({ kind: z.literal('entangled'), qubit: z.number().int().min(0).nullable(), ...specBase })
]);

/** POST /api/teams/{slug}/breakpoints */
export const createBreakpointSchema = z.object({ circuitId: id24, version: z.number().int().min(1), breakpoint: breakpointSpecSchema });

/** PATCH /api/teams/{slug}/breakpoints/{id}: a new note, based on the revision the editor saw. */
export const annotateSchema = z.object({ note: z.string().max(4000), revision: z.number().int().min(1) });

export const commentSchema = z.object({ body: z.string().trim().min(1, 'Write something first.').max(8000, 'At most 8000 characters.') });

export const createReportSchema = z.object({
	traceId: id24,
	step: z.number().int().min(0),
	title: z.string().trim().min(1, 'Give the report a title.').max(160, 'At most 160 characters.'),
	description: z.string().max(20_000, 'At most 20000 characters.').default(''),
	severity: z.enum(SEVERITIES).default('medium'),
	assigneeId: id24.nullable().default(null),
	reviewerId: id24.nullable().default(null)
});
export type CreateReportInput = z.infer<typeof createReportSchema>;

/** PATCH /api/teams/{slug}/reports/{id}: any of status, assignee, reviewer, severity, with the revision seen. */
export const updateReportSchema = z.object({
	revision: z.number().int().min(1),
	status: z.enum(REPORT_STATUSES).optional(),
	assigneeId: id24.nullable().optional(),
	reviewerId: id24.nullable().optional(),
	severity: z.enum(SEVERITIES).optional()
});
export type UpdateReportInput = z.infer<typeof updateReportSchema>;

export const TRACE_SORTS = ['created_desc', 'created_asc', 'circuit', 'author', 'divergence'] as const;
export const REPORT_SORTS = ['updated_desc', 'created_desc', 'created_asc', 'severity', 'status', 'title'] as const;

const emptyToUndefined = (v: unknown) => (v === '' || v === null ? undefined : v);
const isoDate = z.preprocess(emptyToUndefined, z.string().regex(/^\d{4}-\d{2}-\d{2}$/, 'A date as YYYY-MM-DD.').optional());

export const traceQuerySchema = z.object({
	circuit: z.preprocess(emptyToUndefined, id24.optional()),
	author: z.preprocess(emptyToUndefined, id24.optional()),
	diverged: z.preprocess(emptyToUndefined, z.enum(['yes', 'no']).optional()),
	from: isoDate,
	to: isoDate,
	sort: z.preprocess(emptyToUndefined, z.enum(TRACE_SORTS).default('created_desc')),
	page: z.preprocess(emptyToUndefined, z.coerce.number().int().min(1).max(100_000).default(1)),
	perPage: z.preprocess(emptyToUndefined, z.coerce.number().int().min(1).max(100).default(20))
});
export type TraceQuery = z.infer<typeof traceQuerySchema>;

export const reportQuerySchema = z.object({
	status: z.preprocess(emptyToUndefined, z.enum(REPORT_STATUSES).optional()),
	severity: z.preprocess(emptyToUndefined, z.enum(SEVERITIES).optional()),
	assignee: z.preprocess(emptyToUndefined, id24.optional()),
	circuit: z.preprocess(emptyToUndefined, id24.optional()),
	sort: z.preprocess(emptyToUndefined, z.enum(REPORT_SORTS).default('updated_desc')),
	page: z.preprocess(emptyToUndefined, z.coerce.number().int().min(1).max(100_000).default(1)),
	perPage: z.preprocess(emptyToUndefined, z.coerce.number().int().min(1).max(100).default(20))
});
export type ReportQuery = z.infer<typeof reportQuerySchema>;

/** Largest snapshot accepted, in bytes. */
export const MAX_SNAPSHOT_BYTES = 5 * 1024 * 1024;
