import { error } from '@sveltejs/kit';
import { db } from '$lib/server/db';
import { requireTeamRole } from '$lib/server/guard';
import { loadTeamReview } from '$lib/server/review';
import { findTrace, traceView } from '$lib/server/repositories/traces';
import { findVersion } from '$lib/server/repositories/circuits';
import { findReport } from '$lib/server/repositories/reports';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async ({ locals, params, url }) => {
	const access = await requireTeamRole(locals, params.slug, 'trace.replay', { redirectFrom: url });
	const trace = await findTrace(db, access.team.id, params.id);
	if (!trace) error(404, { message: 'No such trace in this team.', code: 'not_found' });
	const version = await findVersion(db, trace.circuit_id, trace.version);
	if (!version) error(404, { message: 'The circuit version of this trace is gone.', code: 'not_found' });
	const asked = Number(url.searchParams.get('step') ?? trace.divergence_step ?? 0);
	const step = Number.isInteger(asked) ? Math.max(0, Math.min(trace.last_step, asked)) : 0;
	const reportId = url.searchParams.get('report');
	const report = reportId && /^[a-z2-7]{24}$/.test(reportId) ? await findReport(db, access.team.id, reportId) : undefined;
	return {
		trace: traceView(trace, true) as ReturnType<typeof traceView> & { summary: typeof trace.summary; keyframeChecksums: typeof trace.keyframe_checksums },
		document: version.document,
		step,
		report: report && report.trace.id === trace.id ? { id: report.id, title: report.title, status: report.status, step: report.step } : null,
		review: await loadTeamReview(access, version.id)
	};
};
