import knex from 'knex';
import { afterAll, describe, expect, it } from 'vitest';
import { checkDatabase } from '../../src/lib/server/health';
import { haveTestDb, openTestDb, quietLog } from './test-db';

describe.skipIf(!haveTestDb)('health check', () => {
	const db = haveTestDb ? openTestDb() : (null as never);
	afterAll(() => db?.destroy());

	it('reports up after a real query succeeds', async () => {
		expect(await checkDatabase(db)).toEqual({ ok: true, db: 'up' });
	});

	it('reports down with a reason when nothing listens on the port', async () => {
		// Port 1 on loopback: nothing listens there on these machines (common practice).
		const dead = knex({ client: 'mysql2', log: quietLog, connection: { host: '127.0.0.1', port: 1, user: 'x', password: 'x' } });
		const report = await checkDatabase(dead, 1500);
		await dead.destroy();
		expect(report.ok).toBe(false);
		if (!report.ok) expect(report.reason).toMatch(/refused|no answer/);
	});

	it('reports down when the credentials are wrong', async () => {
		const conn = db.client.config.connection as { host: string; port: number };
		const wrong = knex({ client: 'mysql2', log: quietLog, connection: { host: conn.host, port: conn.port, user: 'nobody', password: 'wrong' } });
		const report = await checkDatabase(wrong, 3000);
		await wrong.destroy();
		expect(report).toEqual({ ok: false, db: 'down', reason: 'database refused the credentials' });
	});
});
