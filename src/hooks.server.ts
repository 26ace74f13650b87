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
	// The token is looked up first: a valid one is never refused for other clients' failures from
	// the same address (a proxy, a shared CI network). Only a token proven invalid counts against
	// the address, and once the address is over its limit, invalid tokens get 429 instead of 401.
	// Guessing stays hopeless either way: a token carries 160 random bits.
	const found = await authenticateToken(db, m[1]);
	if (!found) {
		try {
			await limits.badToken.reject(event.getClientAddress());
		} catch (e) {
			if (e instanceof TooManyAttempts) return apiError(429, e.message, { 'retry-after': String(e.retryAfterSeconds) });
			throw e;
		}
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
	return withSecurityHeaders(api && response.status >= 400 ? await asApiError(response) : response);
};

/**
 * Headers on every answer (issue 10). Pages carry the policy of `kit.csp` (svelte.config.js: the
 * app's own scripts with SvelteKit's nonce, no framing, no plugins, no foreign base or form
 * target); every other answer (API JSON, images, files, redirects) gets a deny-all policy, so a
 * stored file opened directly can run nothing. Reset and invitation links carry their token in
 * the path: the referrer policy keeps it from reaching other sites.
 */
function withSecurityHeaders(response: Response): Response {
	const set = (h: Headers) => {
		h.set('x-content-type-options', 'nosniff');
		h.set('referrer-policy', 'same-origin');
		h.set('x-frame-options', 'DENY');
		// A page already has kit.csp's policy (and the report board its sandboxed one): keep it.
		if (h.has('content-security-policy')) return;
		h.set('content-security-policy', "default-src 'none'; frame-ancestors 'none'; base-uri 'none'; form-action 'none'");
	};
	try {
		set(response.headers);
		return response;
	} catch {
		// Immutable headers (a fetched response): copy.
		const copy = new Response(response.body, response);
		set(copy.headers);
		return copy;
	}
}

export const handleError: HandleServerError = ({ error, status, message }) => {
	if (status >= 500) console.error(error);
	return { message: status >= 500 ? 'Something broke on our side.' : message, code: codeForStatus(status) };
};
