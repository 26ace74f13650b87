// The browser's one way to call the app's JSON API (pages load through `load` and write through form
// actions; this is for what polls or acts without leaving the page). Every answer is { ok, data } or
// { ok: false, status, message } with the server's own sentence, so components show it as it is.
// Response types come from ./types.ts, which the endpoints' bodies satisfy.
import { routes } from '$lib/routes';
import type { CheckRequest } from '$lib/schemas/checks';
import type { CheckCancelledResponse, CheckQueuedResponse, CircuitChecksResponse } from './types';

export type ApiResult<T> = { ok: true; data: T } | { ok: false; status: number; message: string };

/** One request to an api/ path; status 0 when the server could not be reached. */
export async function callApi<T>(path: string, init: { method?: string; json?: unknown; form?: FormData; accept?: 'json' } = {}): Promise<ApiResult<T>> {
	let res: Response;
	try {
		res = await fetch(path, {
			method: init.method ?? (init.json !== undefined || init.form ? 'POST' : 'GET'),
			headers: init.json !== undefined ? { 'content-type': 'application/json' } : { accept: 'application/json' },
			body: init.form ?? (init.json !== undefined ? JSON.stringify(init.json) : undefined)
		});
	} catch {
		return { ok: false, status: 0, message: 'The server could not be reached; check the connection and try again.' };
	}
	if (res.status === 204) return { ok: true, data: undefined as T };
	const body = await res.json().catch(() => null);
	if (!res.ok) return { ok: false, status: res.status, message: body?.error?.message ?? `The request failed (${res.status}).` };
	return { ok: true, data: body as T };
}

/** Server checks of a circuit (the role is checked by the endpoint). */
export const checksApi = {
	list: (slug: string, circuitId: string) => callApi<CircuitChecksResponse>(routes.api.circuitChecks(slug, circuitId)),
	request: (slug: string, circuitId: string, body: CheckRequest = {}) => callApi<CheckQueuedResponse>(routes.api.circuitChecks(slug, circuitId), { json: body }),
	cancel: (slug: string, checkId: string) => callApi<CheckCancelledResponse>(routes.api.checkCancel(slug, checkId), { json: {} })
};
