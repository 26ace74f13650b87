import { json } from '@sveltejs/kit';
import { db } from '$lib/server/db';
import { checkDatabase } from '$lib/server/health';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = async () => {
	const report = await checkDatabase(db);
	return json(report, { status: report.ok ? 200 : 503, headers: { 'cache-control': 'no-store' } });
};
