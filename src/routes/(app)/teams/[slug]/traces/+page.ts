import { error } from '@sveltejs/kit';
import { routes } from '$lib/routes';
import type { PageLoad } from './$types';

export type TraceListItem = {
	id: string;
	circuit: { id: string; title: string; version: number };
	author: { id: string; name: string } | null;
	label: string;
	engine: string;
	inputs: { values: Record<string, string>; superposed: string[] };
	diverged: boolean;
	firstDivergence: { step: number; qubit: number; label: string } | null;
	lastStep: number;
	computedBy: string;
	createdAt: string;
};

export const load: PageLoad = async ({ fetch, params, url, data }) => {
	const res = await fetch(`${routes.api.traces(params.slug)}${url.search}`);
	const body = await res.json();
	if (!res.ok) error(res.status, body?.error?.message ?? 'The traces could not be read.');
	return { ...data, list: body as { traces: TraceListItem[]; page: number; pages: number; total: number; perPage: number } };
};
