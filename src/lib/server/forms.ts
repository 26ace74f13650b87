import { fail } from '@sveltejs/kit';
import type { z } from 'zod';

export type FieldErrors = Record<string, string[] | undefined>;

/** Field names whose values are never echoed back to the browser. */
const SECRET_FIELDS = new Set(['password', 'confirm', 'currentPassword']);

export function formToObject(data: FormData): Record<string, string> {
	const out: Record<string, string> = {};
	for (const [k, v] of data) if (typeof v === 'string') out[k] = v;
	return out;
}

function typedBack(raw: Record<string, string>): Record<string, string> {
	const values: Record<string, string> = {};
	for (const [k, v] of Object.entries(raw)) if (!SECRET_FIELDS.has(k)) values[k] = v;
	return values;
}

/**
 * Parse a form with its schema. On failure returns `fail(400, { errors, values })` (never the
 * password) for the action to return as it is.
 */
export async function parseForm<S extends z.ZodType>(request: Request, schema: S) {
	const raw = formToObject(await request.formData());
	const parsed = schema.safeParse(raw);
	if (parsed.success) return { ok: true as const, data: parsed.data as z.infer<S>, raw };
	const errors: FieldErrors = {};
	for (const issue of parsed.error.issues) {
		const key = String(issue.path[0] ?? 'form');
		(errors[key] ??= []).push(issue.message);
	}
	return { ok: false as const, failure: fail(400, { errors, values: typedBack(raw) }), raw };
}

/** A failure not tied to a field (or tied to one), in the same shape as validation failures. */
export function formFailure(status: number, message: string, raw: Record<string, string> = {}, field = 'form') {
	return fail(status, { errors: { [field]: [message] } as FieldErrors, values: typedBack(raw) });
}
