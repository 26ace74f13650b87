// The browser's calls to the debugging JSON API. Every answer is { ok, data } or { ok: false,
// message } with the server's own sentence, so components can show it as it is.

export type ApiResult<T> = { ok: true; data: T } | { ok: false; status: number; message: string };

export async function callApi<T>(path: string, init: { method?: string; json?: unknown; form?: FormData } = {}): Promise<ApiResult<T>> {
	let res: Response;
	try {
		res = await fetch(path, {
			method: init.method ?? (init.json !== undefined || init.form ? 'POST' : 'GET'),
			headers: init.json !== undefined ? { 'content-type': 'application/json' } : undefined,
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
