import { error } from '@sveltejs/kit';
import { z } from 'zod';
import { db } from '$lib/server/db';
import { requireTeamRole } from '$lib/server/guard';
import { formFailure, parseForm } from '$lib/server/forms';
import { addReportComment, findReport, listReportComments, reportHistory, ReportConflict, updateReport } from '$lib/server/repositories/reports';
import { listMembers } from '$lib/server/repositories/teams';
import { eventsOfChange, notifyReportEvent } from '$lib/server/report-mail';
import { commentSchema } from '$lib/schemas/review';
import { REPORT_STATUSES, SEVERITIES, STATUS_MOVES } from '$lib/review/reports';
import { can } from '$lib/permissions';
import { latestCheckOfVersion } from '$lib/server/checks/store';
import { listStatus } from '$lib/server/checks/view';
import type { Actions, PageServerLoad } from './$types';

const NOT_FOUND = { message: 'No such report in this team.', code: 'not_found' };

export const load: PageServerLoad = async ({ locals, params, url, depends }) => {
	depends('app:report');
	const access = await requireTeamRole(locals, params.slug, 'report.view', { redirectFrom: url });
	const report = await findReport(db, access.team.id, params.id);
	if (!report) error(404, NOT_FOUND);
	const strip = (p: typeof report.assignee) => (p ? { id: p.id, name: p.name } : null);
	// The server's verdict on the version the report's trace ran (never a client's word).
	const check = await latestCheckOfVersion(db, report.circuit.id, report.trace.version);
	return {
		serverCheck: check
			? { status: listStatus(check.status), version: check.version, method: check.method, cases: check.cases, failed: check.failed, exhaustive: check.exhaustive, message: check.message, ...(check.status === 'error' || check.status === 'cancelled' ? { outcome: check.status } : {}) }
			: { status: 'none' as const, method: null, cases: 0 },
		report: { ...report, assignee: strip(report.assignee), reviewer: strip(report.reviewer) },
		comments: await listReportComments(db, report.id),
		history: await reportHistory(db, access.team.id, report.id),
		members: (await listMembers(db, access.team.id)).map((m) => ({ id: m.user_id, name: m.name, role: m.role })),
		moves: STATUS_MOVES[report.status],
		rights: { comment: can(access.role, 'report.comment'), status: can(access.role, 'report.status'), edit: can(access.role, 'report.edit') }
	};
};

const revision = z.coerce.number().int().min(1);
const statusForm = z.object({ status: z.enum(REPORT_STATUSES, { message: 'Pick a status.' }), revision });
const id24 = z.string().regex(/^[a-z2-7]{24}$/);
const optionalPerson = z.preprocess((v) => (v === '' ? null : v), id24.nullable());
const peopleForm = z.object({ assigneeId: optionalPerson, reviewerId: optionalPerson, severity: z.enum(SEVERITIES), revision });

async function apply(locals: App.Locals, params: { slug: string; id: string }, need: 'report.status' | 'report.edit', change: Parameters<typeof updateReport>[4], raw: Record<string, string>) {
	const access = await requireTeamRole(locals, params.slug, need);
	const before = await findReport(db, access.team.id, params.id);
	if (!before) error(404, NOT_FOUND);
	try {
		const r = await updateReport(db, access.team.id, params.id, access.user.id, change);
		const after = (await findReport(db, access.team.id, params.id))!;
		for (const event of eventsOfChange(before, after)) await notifyReportEvent(db, { teamId: access.team.id, team: access.team, actor: access.user, report: after }, event);
		return { updated: r.changed.length > 0 };
	} catch (e) {
		if (e instanceof ReportConflict) return formFailure(e.status, e.message, raw);
		throw e;
	}
}

export const actions: Actions = {
	comment: async ({ locals, params, request }) => {
		const access = await requireTeamRole(locals, params.slug, 'report.comment');
		const report = await findReport(db, access.team.id, params.id);
		if (!report) error(404, NOT_FOUND);
		const form = await parseForm(request, commentSchema);
		if (!form.ok) return form.failure;
		await addReportComment(db, access.team.id, params.id, access.user.id, form.data.body);
		await notifyReportEvent(db, { teamId: access.team.id, team: access.team, actor: access.user, report }, { kind: 'comment', body: form.data.body });
		return { commented: true };
	},
	status: async ({ locals, params, request }) => {
		await requireTeamRole(locals, params.slug, 'report.status');
		const form = await parseForm(request, statusForm);
		if (!form.ok) return form.failure;
		return apply(locals, params, 'report.status', { status: form.data.status, revision: form.data.revision }, form.raw);
	},
	people: async ({ locals, params, request }) => {
		await requireTeamRole(locals, params.slug, 'report.edit');
		const form = await parseForm(request, peopleForm);
		if (!form.ok) return form.failure;
		return apply(locals, params, 'report.edit', form.data, form.raw);
	}
};
