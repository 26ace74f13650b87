import { error, isHttpError, isRedirect, json } from '@sveltejs/kit';

// One place that turns failures into HTTP answers. Database errors become a status and a plain
// sentence; SQL and stack traces stay in the server log.

export type ErrorCode =
	| 'bad_request'
	| 'unauthorized'
	| 'forbidden'
	| 'not_found'
	| 'conflict'
	| 'rate_limited'
	| 'internal'
	| 'method_not_allowed';

const CODE_BY_STATUS: Record<number, ErrorCode> = {
	400: 'bad_request',
	401: 'unauthorized',
	403: 'forbidden',
	404: 'not_found',
	405: 'method_not_allowed',
	409: 'conflict',
	429: 'rate_limited',
	500: 'internal'
};

export function codeForStatus(status: number): ErrorCode {
	return CODE_BY_STATUS[status] ?? (status >= 500 ? 'internal' : 'bad_request');
}

type DbError = { code?: string; errno?: number; sqlMessage?: string };

/** MariaDB error codes to HTTP: returns null for errors that are not the database's. */
export function dbErrorStatus(e: unknown): { status: number; message: string } | null {
	const err = e as DbError;
	if (!err || typeof err !== 'object' || typeof err.code !== 'string') return null;
	switch (err.code) {
		case 'ER_DUP_ENTRY':
			return { status: 409, message: 'That already exists.' };
		case 'ER_NO_REFERENCED_ROW':
		case 'ER_NO_REFERENCED_ROW_2':
			return { status: 409, message: 'Something this refers to no longer exists.' };
		case 'ER_ROW_IS_REFERENCED':
		case 'ER_ROW_IS_REFERENCED_2':
			return { status: 409, message: 'Other records still refer to this.' };
		case 'ER_DATA_TOO_LONG':
		case 'ER_TRUNCATED_WRONG_VALUE':
		case 'WARN_DATA_TRUNCATED':
			return { status: 400, message: 'A value is too long or has the wrong form.' };
		case 'ER_LOCK_DEADLOCK':
		case 'ER_LOCK_WAIT_TIMEOUT':
			return { status: 503, message: 'The database is busy; try again.' };
		case 'ECONNREFUSED':
		case 'PROTOCOL_CONNECTION_LOST':
			return { status: 503, message: 'The database is not reachable.' };
		default:
			return null;
	}
}

export function isDuplicateKey(e: unknown): boolean {
	return (e as DbError)?.code === 'ER_DUP_ENTRY';
}

/** Re-throw a database error as a SvelteKit HTTP error; anything else is re-thrown untouched. */
export function rethrowDb(e: unknown): never {
	if (isHttpError(e) || isRedirect(e)) throw e;
	const mapped = dbErrorStatus(e);
	if (mapped) {
		console.error('database error', (e as DbError).code, (e as DbError).sqlMessage);
		error(mapped.status, { message: mapped.message, code: codeForStatus(mapped.status) });
	}
	throw e;
}

/** The JSON error body every /api route answers with. */
export function apiError(status: number, message: string, headers?: Record<string, string>): Response {
	return json({ error: { code: codeForStatus(status), message } }, { status, headers: { 'cache-control': 'no-store', ...headers } });
}

/** Turn anything thrown inside an /api handler into `{ error: { code, message } }`. */
export function toApiErrorResponse(e: unknown): Response {
	if (isHttpError(e)) {
		const headers: Record<string, string> = {};
		const retry = (e.body as { retryAfter?: number }).retryAfter;
		if (e.status === 429 && retry) headers['retry-after'] = String(retry);
		return apiError(e.status, e.body.message, headers);
	}
	const mapped = dbErrorStatus(e);
	if (mapped) {
		console.error('database error', (e as DbError).code, (e as DbError).sqlMessage);
		return apiError(mapped.status, mapped.message);
	}
	console.error(e);
	return apiError(500, 'Something broke on our side; the details are in the server log.');
}
