import { error } from '@sveltejs/kit';
import { routes } from '$lib/routes';
import type { ReportStatus, Severity } from '$lib/debug/reports';
import type { PageLoad } from './$types';

export type ReportListItem = {
	id: string;
	title: string;
	severity: Severity;
	status: ReportStatus;
	step: number;
	circuit: { id: string; title: string };
	trace: { id: string; version: number };
	author: { id: string; name: string } | null;
	assignee: { id: string; name: string } | null;
	reviewer: { id: string; name: string } | null;
	updatedAt: string;
	createdAt: string;
};

export const load: PageLoad = async ({ fetch, params, url, data }) => {
	const res = await fetch(`${routes.api.reports(params.slug)}${url.search}`);
	const body = await res.json();
	if (!res.ok) error(res.status, body?.error?.message ?? 'The reports could not be read.');
	return { ...data, list: body as { reports: ReportListItem[]; page: number; pages: number; total: number } };
};
