import { error } from '@sveltejs/kit';
import type { z } from 'zod';
import { db } from './db';
import { listReports } from './repositories/reports';
import { listTraces, traceView } from './repositories/traces';
import { reportQuerySchema, traceQuerySchema } from '$lib/schemas/review';
import { routes } from '$lib/routes';

// One page of the traces table and of the reports table, read from a query string. The JSON API
// (`api/teams/[slug]/traces|reports`) and the pages' `load` both call these, so the filters, the
// sort, the paging and the row shape exist once; the pages take their types from the return values.

type Team = { id: string; slug: string };

/** Parse a query string with its schema; 400 naming each bad parameter otherwise. */
export function readQuery<S extends z.ZodType>(url: URL, schema: S): z.infer<S> {
	const q = schema.safeParse(Object.fromEntries(url.searchParams));
	if (!q.success) error(400, { message: q.error.issues.map((i) => `${i.path.join('.') || 'query'}: ${i.message}`).join('; '), code: 'bad_request' });
	return q.data;
}

const paging = <Q extends { sort: string; page: number; perPage: number }>(q: Q, total: number) => ({ sort: q.sort, page: q.page, perPage: q.perPage, total, pages: Math.max(1, Math.ceil(total / q.perPage)) });

/** `?circuit=&author=&diverged=yes|no&from=YYYY-MM-DD&to=YYYY-MM-DD&sort=&page=&perPage=` */
export async function traceListPage(team: Team, url: URL) {
	const q = readQuery(url, traceQuerySchema);
	const { rows, total } = await listTraces(db, team.id, q);
	return { traces: rows.map((r) => ({ ...traceView(r, false), links: { replay: routes.replay(team.slug, r.id) } })), ...paging(q, total) };
}

/** `?status=&severity=&assignee=&circuit=&sort=&page=&perPage=` (descriptions left out: a table shows none). */
export async function reportListPage(team: Team, url: URL) {
	const q = readQuery(url, reportQuerySchema);
	const { rows, total } = await listReports(db, team.id, q);
	return { reports: rows.map(({ description: _d, descriptionHtml: _h, ...r }) => ({ ...r, links: { page: routes.report(team.slug, r.id) } })), ...paging(q, total) };
}

export type TraceListPage = Awaited<ReturnType<typeof traceListPage>>;
export type ReportListPage = Awaited<ReturnType<typeof reportListPage>>;
