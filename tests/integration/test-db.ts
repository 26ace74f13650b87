import knex, { type Knex } from 'knex';
import knexConfig from '../../knexfile';

/** True when npm test started a throwaway database for this run. */
export const haveTestDb = process.env.ORRERY_TEST_RUN === '1';

type Migration = { up: (k: Knex) => Promise<void>; down: (k: Knex) => Promise<void> };

// Vitest loads modules through Vite, Knex through Node's own import(), which cannot read .ts:
// hand Knex the migration modules Vite already compiled.
const modules = import.meta.glob<Migration>('../../migrations/*.ts');
const migrationSource: Knex.MigrationSource<string> = {
	getMigrations: async () => Object.keys(modules).sort(),
	getMigrationName: (path) => path.split('/').pop()!,
	getMigration: (path) => modules[path]()
};

export function openTestDb(): Knex {
	if (!haveTestDb) throw new Error('integration tests need the throwaway database that npm test starts');
	return knex({ ...knexConfig, migrations: { migrationSource } });
}

/** Knex logs pool errors itself; tests that expect a dead database keep the output clean. */
export const quietLog = { warn() {}, error() {}, deprecate() {}, debug() {} };
