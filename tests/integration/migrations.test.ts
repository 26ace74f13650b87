import { afterAll, describe, expect, it } from 'vitest';
import { haveTestDb, openTestDb } from './test-db';

describe.skipIf(!haveTestDb)('migrations on the throwaway database', () => {
	const db = haveTestDb ? openTestDb() : (null as never);
	afterAll(() => db?.destroy());

	async function tables(): Promise<string[]> {
		const [rows] = (await db.raw('SHOW TABLES')) as [Record<string, string>[]];
		return rows.map((r) => Object.values(r)[0]).filter((t) => !t.startsWith('knex_'));
	}

	it('go up, all the way down, and up again with the same tables', async () => {
		await db.migrate.latest();
		const first = (await tables()).sort();
		expect(first).toContain('app_meta');
		expect(first).toContain('audit_log');

		await db.migrate.rollback(undefined, true);
		expect(await tables()).toEqual([]);

		await db.migrate.latest();
		expect((await tables()).sort()).toEqual(first);
	});

	it('store utf8mb4 text intact (server charset is set)', async () => {
		await db('app_meta').insert({ key: 'probe', value: 'φ = 2π·5/2⁴ ✓' }).onConflict('key').merge();
		const row = await db('app_meta').where({ key: 'probe' }).first();
		expect(row.value).toBe('φ = 2π·5/2⁴ ✓');
		await db('app_meta').where({ key: 'probe' }).delete();
	});
});
