import type { Knex } from 'knex';
import type { Db } from '../db';
import { newId } from '../ids';
import { renderMarkdown } from '../markdown';
import { deleteReportSnapshots, insertAttachment } from './attachments';
import { canMove, STATUS_LABEL, type ReportStatus, type Severity } from '$lib/review/reports';
import type { CreateReportInput, ReportQuery, UpdateReportInput } from '$lib/schemas/review';
import type { LedgerExcerpt } from '$lib/review/types';

type Person = { id: string; name: string; email?: string } | null;

export type ReportView = {
	id: string;
	title: string;
	descriptionHtml: string;
	description: string;
	severity: Severity;
	status: ReportStatus;
	step: number;
	trace: { id: string; version: number; lastStep: number };
	circuit: { id: string; title: string };
	author: Person;
	assignee: Person;
	reviewer: Person;
	snapshot: { id: string; width: number | null; height: number | null; byteSize: number } | null;
	/** The server-drawn dial board at the report's step (reports from the command line), with its ledger excerpt. */
	board: { ledger: LedgerExcerpt | null } | null;
	revision: number;
	createdAt: string;
	updatedAt: string;
};

export class ReportConflict extends Error {
	constructor(
		message: string,
		readonly status: 409 | 422
	) {
		super(message);
	}
}

const person = (id: string | null, name: string | null, email?: string | null): Person => (id ? { id, name: name ?? '', ...(email ? { email } : {}) } : null);

function base(db: Db) {
	return db('reports as r')
		.join('circuits as c', 'c.id', 'r.circuit_id')
		.join('traces as t', 't.id', 'r.trace_id')
		.leftJoin('users as au', 'au.id', 'r.author_id')
		.leftJoin('users as asg', 'asg.id', 'r.assignee_id')
		.leftJoin('users as rv', 'rv.id', 'r.reviewer_id')
		.leftJoin('attachments as a', 'a.id', 'r.snapshot_id')
		.select(
			'r.id',
			'r.team_id',
			'r.trace_id',
			'r.circuit_id',
			'r.step',
			'r.title',
			'r.description_md',
			'r.description_html',
			'r.severity',
			'r.status',
			'r.author_id',
			'r.assignee_id',
			'r.reviewer_id',
			'r.snapshot_id',
			'r.revision',
			'r.created_at',
			'r.updated_at',
			'r.board_ledger',
			db.raw('r.board_svg IS NOT NULL as has_board'),
			'c.title as circuit_title',
			't.version as trace_version',
			't.last_step as trace_last_step',
			'au.name as author_name',
			'asg.name as assignee_name',
			'asg.email as assignee_email',
			'rv.name as reviewer_name',
			'rv.email as reviewer_email',
			'a.width as snapshot_width',
			'a.height as snapshot_height',
			'a.byte_size as snapshot_bytes'
		);
}

function toView(r: Record<string, never>): ReportView {
	return {
		id: r.id,
		title: r.title,
		description: r.description_md,
		descriptionHtml: r.description_html,
		severity: r.severity,
		status: r.status,
		step: r.step,
		trace: { id: r.trace_id, version: r.trace_version, lastStep: r.trace_last_step },
		circuit: { id: r.circuit_id, title: r.circuit_title },
		author: person(r.author_id, r.author_name),
		assignee: person(r.assignee_id, r.assignee_name, r.assignee_email),
		reviewer: person(r.reviewer_id, r.reviewer_name, r.reviewer_email),
		snapshot: r.snapshot_id ? { id: r.snapshot_id, width: r.snapshot_width, height: r.snapshot_height, byteSize: r.snapshot_bytes } : null,
		board: r.has_board ? { ledger: r.board_ledger ? (typeof r.board_ledger === 'string' ? JSON.parse(r.board_ledger) : r.board_ledger) : null } : null,
		revision: r.revision,
		createdAt: (r.created_at as Date).toISOString(),
		updatedAt: (r.updated_at as Date).toISOString()
	};
}

export async function findReport(db: Db, teamId: string, id: string): Promise<ReportView | undefined> {
	const r = await base(db).where({ 'r.team_id': teamId, 'r.id': id }).first();
	return r ? toView(r) : undefined;
}

async function isMember(db: Db, teamId: string, userId: string): Promise<boolean> {
	return Boolean(await db('memberships').where({ team_id: teamId, user_id: userId }).first('user_id'));
}

/** The report, its snapshot (when given) and the audit entry in one transaction. */
export async function createReport(
	db: Knex,
	p: { teamId: string; authorId: string; input: CreateReportInput; snapshot: { bytes: Uint8Array; width: number; height: number } | null }
): Promise<string> {
	return db.transaction(async (trx) => {
		const trace = await trx('traces').where({ team_id: p.teamId, id: p.input.traceId }).first('id', 'circuit_id', 'last_step');
		if (!trace) throw new ReportConflict('No such trace in this team.', 422);
		if (p.input.step > trace.last_step) throw new ReportConflict(`Step ${p.input.step} is past the end of the trace (last step ${trace.last_step}).`, 422);
		for (const [field, uid] of [['assignee', p.input.assigneeId], ['reviewer', p.input.reviewerId]] as const)
			if (uid && !(await isMember(trx, p.teamId, uid))) throw new ReportConflict(`The ${field} must be a member of this team.`, 422);
		const snapshotId = p.snapshot ? await insertAttachment(trx, { teamId: p.teamId, userId: p.authorId, contentType: 'image/png', ...p.snapshot }) : null;
		const id = newId();
		const now = new Date();
		await trx('reports').insert({
			id,
			team_id: p.teamId,
			trace_id: trace.id,
			circuit_id: trace.circuit_id,
			step: p.input.step,
			title: p.input.title,
			description_md: p.input.description,
			description_html: renderMarkdown(p.input.description),
			severity: p.input.severity,
			status: 'open',
			author_id: p.authorId,
			assignee_id: p.input.assigneeId,
			reviewer_id: p.input.reviewerId,
			snapshot_id: snapshotId,
			created_at: now,
			updated_at: now
		});
		await trx('audit_log').insert({ actor_id: p.authorId, team_id: p.teamId, action: 'report.create', subject_type: 'report', subject_id: id, detail: JSON.stringify({ status: 'open', severity: p.input.severity }) });
		return id;
	});
}

/**
 * Apply a change when `revision` is still current (else 409): status moves only along the
 * report graph (else 422); assignee and reviewer must be members. Each change is audited.
 */
export async function updateReport(db: Knex, teamId: string, id: string, actorId: string, change: UpdateReportInput): Promise<{ revision: number; changed: string[] }> {
	return db.transaction(async (trx) => {
		const row = await trx('reports').where({ team_id: teamId, id }).forUpdate().first();
		if (!row) throw new ReportConflict('No such report in this team.', 422);
		if (row.revision !== change.revision)
			throw new ReportConflict(`Someone changed this report since you opened it (it is now at revision ${row.revision}, you had ${change.revision}). Reload it and try again.`, 409);
		const update: Record<string, unknown> = {};
		const audit: { action: string; detail: Record<string, unknown> }[] = [];
		if (change.status && change.status !== row.status) {
			if (!canMove(row.status, change.status))
				throw new ReportConflict(`A report cannot go from ${STATUS_LABEL[row.status as ReportStatus]} to ${STATUS_LABEL[change.status]}.`, 422);
			update.status = change.status;
			audit.push({ action: 'report.status', detail: { from: row.status, to: change.status } });
		}
		for (const [field, col] of [['assigneeId', 'assignee_id'], ['reviewerId', 'reviewer_id']] as const) {
			const v = change[field];
			if (v === undefined || v === row[col]) continue;
			if (v && !(await isMember(trx, teamId, v))) throw new ReportConflict(`The ${field === 'assigneeId' ? 'assignee' : 'reviewer'} must be a member of this team.`, 422);
			update[col] = v;
			audit.push({ action: field === 'assigneeId' ? 'report.assign' : 'report.reviewer', detail: { from: row[col], to: v } });
		}
		if (change.severity && change.severity !== row.severity) {
			update.severity = change.severity;
			audit.push({ action: 'report.severity', detail: { from: row.severity, to: change.severity } });
		}
		if (!audit.length) return { revision: row.revision, changed: [] };
		await trx('reports').where({ id }).update({ ...update, revision: row.revision + 1, updated_at: new Date() });
		for (const a of audit) await trx('audit_log').insert({ actor_id: actorId, team_id: teamId, action: a.action, subject_type: 'report', subject_id: id, detail: JSON.stringify(a.detail) });
		return { revision: row.revision + 1, changed: audit.map((a) => a.action) };
	});
}

const SORTS: Record<ReportQuery['sort'], [string, 'asc' | 'desc'][]> = {
	updated_desc: [['r.updated_at', 'desc']],
	created_desc: [['r.created_at', 'desc']],
	created_asc: [['r.created_at', 'asc']],
	severity: [['r.severity', 'desc'], ['r.updated_at', 'desc']],
	status: [['r.status', 'asc'], ['r.updated_at', 'desc']],
	title: [['r.title', 'asc']]
};

export async function listReports(db: Db, teamId: string, q: ReportQuery): Promise<{ rows: ReportView[]; total: number }> {
	const where = (b: Knex.QueryBuilder) => {
		b.where('r.team_id', teamId);
		if (q.status) b.where('r.status', q.status);
		if (q.severity) b.where('r.severity', q.severity);
		if (q.assignee) b.where('r.assignee_id', q.assignee);
		if (q.circuit) b.where('r.circuit_id', q.circuit);
		return b;
	};
	const [{ n }] = (await where(db('reports as r')).count({ n: '*' })) as { n: number | string }[];
	const page = where(base(db)).limit(q.perPage).offset((q.page - 1) * q.perPage);
	// MariaDB sorts ENUM columns by their declared order: low < … < critical, open < … < wont_fix.
	for (const [col, dir] of SORTS[q.sort]) page.orderBy(col, dir);
	page.orderBy('r.id', 'asc');
	return { rows: (await page).map(toView), total: Number(n) };
}

export async function addReportComment(db: Db, teamId: string, reportId: string, authorId: string, body: string): Promise<string> {
	const id = newId();
	await db('report_comments').insert({ id, report_id: reportId, author_id: authorId, body_md: body, body_html: renderMarkdown(body), created_at: new Date() });
	await db('audit_log').insert({ actor_id: authorId, team_id: teamId, action: 'report.comment', subject_type: 'report', subject_id: reportId, detail: JSON.stringify({ comment: id }) });
	return id;
}

export async function listReportComments(db: Db, reportId: string) {
	const rows = await db('report_comments as c').leftJoin('users as u', 'u.id', 'c.author_id').where('c.report_id', reportId).orderBy('c.created_at', 'asc').orderBy('c.id', 'asc').select('c.*', 'u.name as author_name');
	return rows.map((c) => ({ id: c.id as string, author: person(c.author_id, c.author_name), bodyHtml: c.body_html as string, createdAt: (c.created_at as Date).toISOString() }));
}

/** Every change of the report, oldest first, from audit_log. */
export async function reportHistory(db: Db, teamId: string, reportId: string) {
	const rows = await db('audit_log as l')
		.leftJoin('users as u', 'u.id', 'l.actor_id')
		.where({ 'l.team_id': teamId, 'l.subject_type': 'report', 'l.subject_id': reportId })
		.whereNot('l.action', 'report.comment')
		.orderBy('l.id', 'asc')
		.select('l.id', 'l.action', 'l.detail', 'l.created_at', 'u.name as actor_name');
	return rows.map((r) => ({
		id: Number(r.id),
		action: r.action as string,
		detail: (typeof r.detail === 'string' ? JSON.parse(r.detail) : (r.detail ?? {})) as Record<string, string | null>,
		actor: (r.actor_name as string | null) ?? 'someone',
		at: (r.created_at as Date).toISOString()
	}));
}

/** The report, its snapshot and the audit entry go in one transaction (a deleted report's snapshot must not stay readable). */
export async function deleteReport(db: Db, teamId: string, id: string, actorId: string): Promise<boolean> {
	return db.transaction(async (trx) => {
		await deleteReportSnapshots(trx, teamId, { id });
		const n = await trx('reports').where({ team_id: teamId, id }).delete();
		if (n) await trx('audit_log').insert({ actor_id: actorId, team_id: teamId, action: 'report.delete', subject_type: 'report', subject_id: id });
		return n > 0;
	});
}

/** Keep the server-drawn board (SVG) and ledger excerpt of a report. */
export async function setReportBoard(db: Db, reportId: string, svg: string, ledger: LedgerExcerpt | null): Promise<void> {
	await db('reports').where({ id: reportId }).update({ board_svg: svg, board_ledger: ledger ? JSON.stringify(ledger) : null });
}

export async function findReportBoardSvg(db: Db, teamId: string, reportId: string): Promise<string | null> {
	const r = await db('reports').where({ team_id: teamId, id: reportId }).first('board_svg');
	return (r?.board_svg as string | null | undefined) ?? null;
}

export type ReportPerson = { id: string; email: string; name: string; mailReportEvents: boolean; part: 'author' | 'assignee' | 'reviewer' };

/** The reporter, the assignee and the reviewer of a report (those who exist), with their mail setting. */
export async function reportPeople(db: Db, teamId: string, reportId: string): Promise<ReportPerson[]> {
	const r = await db('reports').where({ team_id: teamId, id: reportId }).first('author_id', 'assignee_id', 'reviewer_id');
	if (!r) return [];
	const parts = [['author', r.author_id], ['assignee', r.assignee_id], ['reviewer', r.reviewer_id]] as const;
	const ids = parts.map(([, id]) => id).filter((x): x is string => Boolean(x));
	if (!ids.length) return [];
	// Only current members hear about the team's reports.
	const users = await db('users as u')
		.join('memberships as m', function () {
			this.on('m.user_id', '=', 'u.id').andOn('m.team_id', '=', db.raw('?', [teamId]));
		})
		.whereIn('u.id', ids)
		.select('u.id', 'u.email', 'u.name', 'u.mail_report_events');
	const byId = new Map(users.map((u: { id: string; email: string; name: string; mail_report_events: number | boolean }) => [u.id, u]));
	const out: ReportPerson[] = [];
	for (const [part, id] of parts) {
		const u = id ? byId.get(id) : undefined;
		if (u) out.push({ id: u.id, email: u.email, name: u.name, mailReportEvents: Boolean(u.mail_report_events), part });
	}
	return out;
}
