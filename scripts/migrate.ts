// Migrations and seeds through Knex's API (avoids the CLI's TypeScript loader quirks).
// Usage: node --import tsx scripts/migrate.ts latest|rollback|down-all|seed|status
import knex from 'knex';
import knexConfig from '../knexfile';

const cmd = process.argv[2] ?? 'latest';
const db = knex(knexConfig);
try {
	if (cmd === 'latest') {
		const [batch, done] = await db.migrate.latest();
		console.log(done.length ? `migrated (batch ${batch}): ${done.join(', ')}` : 'database schema is up to date');
	} else if (cmd === 'rollback') {
		const [batch, done] = await db.migrate.rollback();
		console.log(`rolled back batch ${batch}: ${done.join(', ') || 'nothing'}`);
	} else if (cmd === 'down-all') {
		const [, done] = await db.migrate.rollback(undefined, true);
		console.log(`rolled back all: ${done.join(', ') || 'nothing'}`);
	} else if (cmd === 'seed') {
		const [files] = await db.seed.run();
		console.log(`seeded: ${files.map((f: string) => f.split('/').pop()).join(', ')}`);
	} else if (cmd === 'status') {
		const [done, pending] = await db.migrate.list();
		console.log(`done: ${done.length}, pending: ${pending.length}`);
	} else {
		throw new Error(`unknown command ${cmd}; expected latest, rollback, down-all, seed or status`);
	}
} catch (e) {
	const err = e as { code?: string; message?: string };
	if (err.code === 'ECONNREFUSED') {
		console.error(`orrery: cannot reach MariaDB at ${knexConfig.connection && (knexConfig.connection as { port: number }).port}; is it running? (npm start starts it)`);
	} else {
		console.error(`orrery: ${cmd} failed: ${err.message}`);
	}
	process.exitCode = 1;
} finally {
	await db.destroy();
}
