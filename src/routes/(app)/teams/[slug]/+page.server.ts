import { db } from '$lib/server/db';
import { requireTeamRole } from '$lib/server/guard';
import { countMembers } from '$lib/server/repositories/teams';
import { listPendingInvitations } from '$lib/server/repositories/invitations';
import { listActiveTokens } from '$lib/server/repositories/api-tokens';
import { can } from '$lib/permissions';
import { listCircuits } from '$lib/server/repositories/circuits';
import { listReports } from '$lib/server/repositories/reports';
import { circuitCheckView } from '$lib/server/checks/view';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async ({ locals, params, url }) => {
	const { team, role, user } = await requireTeamRole(locals, params.slug, 'team.view', { redirectFrom: url });
	const owner = can(role, 'members.manage');
	const [members, pending, tokens, circuits, mine, open] = await Promise.all([
		countMembers(db, team.id),
		owner ? listPendingInvitations(db, team.id).then((l) => l.length) : Promise.resolve(null),
		listActiveTokens(db, team.id, user.id).then((l) => l.length),
		listCircuits(db, team.id),
		listReports(db, team.id, { assignee: user.id, sort: 'updated_desc', page: 1, perPage: 5 }),
		listReports(db, team.id, { status: 'open', sort: 'updated_desc', page: 1, perPage: 1 })
	]);
	return {
		counts: { members, pending, myTokens: tokens, circuits: circuits.length, openReports: open.total },
		recentCircuits: circuits.slice(0, 5).map((c) => ({ id: c.id, title: c.title, registers: c.register_summary, check: circuitCheckView(c.check) })),
		myReports: mine.rows.filter((r) => r.status !== 'verified' && r.status !== 'wont_fix').map((r) => ({ id: r.id, title: r.title, status: r.status, severity: r.severity, circuit: r.circuit.title }))
	};
};
