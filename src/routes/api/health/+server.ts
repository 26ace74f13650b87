import { json } from '@sveltejs/kit';
import { db } from '$lib/server/db';
import { checkDatabase, checkQueue } from '$lib/server/health';
import { checkQueue as producer } from '$lib/server/checks/enqueue';
import type { RequestHandler } from './$types';

// Both parts must answer: the database and the check queue's Redis. Either down answers 503 with its reason.
export const GET: RequestHandler = async () => {
	const [dbReport, queueReport] = await Promise.all([checkDatabase(db), checkQueue(producer().redis)]);
	const report = { ...dbReport, ...queueReport, ok: dbReport.ok && queueReport.queue === 'up' };
	return json(report, { status: report.ok ? 200 : 503, headers: { 'cache-control': 'no-store' } });
};
