import type { Handle, HandleServerError } from '@sveltejs/kit';
import { lucia } from '$lib/server/auth';
import { db } from '$lib/server/db';
import { apiError, codeForStatus } from '$lib/server/errors';
import { authenticateToken } from '$lib/server/repositories/api-tokens';
import { limits, TooManyAttempts } from '$lib/server/rate-limit';
import { installShutdown } from '$lib/server/shutdown';

// Close the DB pool, the mail transport (and whatever else registers) when adapter-node shuts down.
installShutdown();

const isApiPath = (p: string) => p === '/api' || p.startsWith('/api/');

async function fromBearer(event: Parameters<Handle>[0]['event'], header: string): Promise<Response | null> {
	const m = /^Bearer\s+(\S+)\s*$/i.exec(header);
	if (!m) return apiError(401, 'Send the token as "Authorization: Bearer orr_…".');
	const address = event.getClientAddress();
	try {
		await limits.badToken.check(address);
	} catch (e) {
		if (e instanceof TooManyAttempts) return apiError(429, e.message, { 'retry-after': String(e.retryAfterSeconds) });
		throw e;
	}
	const found = await authenticateToken(db, m[1]);
	if (!found) {
		await limits.badToken.fail(address);
		return apiError(401, 'This API token is not valid or has been revoked.');
	}
	event.locals.user = found.user;
	event.locals.token = found.token;
	return null;
}

async function fromCookie(event: Parameters<Handle>[0]['event']): Promise<void> {
	const sessionId = event.cookies.get(lucia.sessionCookieName);
	if (!sessionId) return;
	const { session, user } = await lucia.validateSession(sessionId);
	if (session?.fresh) {
		const c = lucia.createSessionCookie(session.id);
		event.cookies.set(c.name, c.value, { path: '/', ...c.attributes });
	}
	if (!session) {
		const c = lucia.createBlankSessionCookie();
		event.cookies.set(c.name, c.value, { path: '/', ...c.attributes });
		return;
	}
	event.locals.user = { id: user.id, email: user.email, name: user.name };
	event.locals.session = { id: session.id, expiresAt: session.expiresAt };
}

/** Errors SvelteKit itself produces under /api (no such route, wrong method) get our JSON shape too. */
async function asApiError(res: Response): Promise<Response> {
	let message = res.status === 404 ? 'No such API route.' : res.statusText || 'The request failed.';
	if ((res.headers.get('content-type') ?? '').includes('application/json')) {
		const body = (await res.clone().json().catch(() => null)) as { error?: unknown; message?: string } | null;
		if (body && typeof body.error === 'object') return res;
		if (body?.message) message = body.message;
	}
	const headers: Record<string, string> = {};
	for (const h of ['allow', 'retry-after']) {
		const v = res.headers.get(h);
		if (v) headers[h] = v;
	}
	return apiError(res.status, message, headers);
}

export const handle: Handle = async ({ event, resolve }) => {
	event.locals.user = null;
	event.locals.session = null;
	event.locals.token = null;

	const api = isApiPath(event.url.pathname);
	const authorization = event.request.headers.get('authorization');
	if (api && authorization) {
		const refused = await fromBearer(event, authorization);
		if (refused) return refused;
	} else {
		await fromCookie(event);
	}

	const response = await resolve(event);
	if (api && response.status >= 400) return asApiError(response);
	return response;
};

export const handleError: HandleServerError = ({ error, status, message }) => {
	if (status >= 500) console.error(error);
	return { message: status >= 500 ? 'Something broke on our side.' : message, code: codeForStatus(status) };
};
