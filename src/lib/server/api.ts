import type { RequestEvent, RequestHandler } from '@sveltejs/kit';
import { error } from '@sveltejs/kit';
import { toApiErrorResponse } from './errors';
import type { z } from 'zod';

/** Wrap an /api handler so everything it throws answers as `{ error: { code, message } }`. */
export function apiRoute<E extends RequestEvent>(handler: (event: E) => Promise<Response>): (event: E) => Promise<Response> {
	return async (event) => {
		try {
			const res = await handler(event);
			res.headers.set('cache-control', 'no-store');
			return res;
		} catch (e) {
			return toApiErrorResponse(e);
		}
	};
}

/** Parse a JSON body with its schema; 400 with the first problem per field otherwise. */
export async function readJson<S extends z.ZodType>(request: Request, schema: S): Promise<z.infer<S>> {
	let body: unknown;
	try {
		body = await request.json();
	} catch {
		error(400, { message: 'Send a JSON body.', code: 'bad_request' });
	}
	const parsed = schema.safeParse(body);
	if (!parsed.success) {
		const msg = parsed.error.issues.map((i) => `${i.path.join('.') || 'body'}: ${i.message}`).join('; ');
		error(400, { message: msg, code: 'bad_request' });
	}
	return parsed.data;
}

export type { RequestHandler };
