import { isHttpError } from '@sveltejs/kit';
import { describe, expect, it } from 'vitest';
import { readQuery } from './lists';
import { reportQuerySchema, traceQuerySchema } from '$lib/schemas/review';

// The query string the traces and reports tables share with GET /api/teams/{slug}/traces|reports.

const at = (search: string) => new URL(`http://orrery.test/teams/halvorsen/traces${search}`);

function refusal(run: () => unknown): { status: number; message: string } {
	try {
		run();
	} catch (e) {
		if (isHttpError(e)) return { status: e.status, message: e.body.message };
		throw e;
	}
	throw new Error('expected a refusal');
}

describe('readQuery', () => {
	it('fills the defaults and treats empty fields (a GET form with "any" chosen) as absent', () => {
		expect(readQuery(at(''), traceQuerySchema)).toEqual({ sort: 'created_desc', page: 1, perPage: 20 });
		expect(readQuery(at('?circuit=&author=&diverged=&from=&to=&sort=circuit&page=3'), traceQuerySchema)).toEqual({ sort: 'circuit', page: 3, perPage: 20 });
		expect(readQuery(at('?status=open&severity=&sort='), reportQuerySchema)).toEqual({ status: 'open', sort: 'updated_desc', page: 1, perPage: 20 });
	});

	it('answers 400 naming each bad parameter', () => {
		const r = refusal(() => readQuery(at('?sort=loudest&page=0&from=yesterday'), traceQuerySchema));
		expect(r.status).toBe(400);
		expect(r.message).toMatch(/^from: A date as YYYY-MM-DD\./);
		expect(r.message).toContain('sort: ');
		expect(r.message).toContain('page: ');
	});
});
