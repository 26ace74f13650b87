import type { Knex } from 'knex';
import { config } from './src/lib/server/config';

const knexConfig: Knex.Config = {
	client: 'mysql2',
	connection: {
		host: config.db.host,
		port: config.db.port,
		user: config.db.user,
		password: config.db.password,
		database: config.db.database,
		charset: 'utf8mb4',
		// Keep DATETIME values in UTC both ways.
		timezone: 'Z',
		supportBigNumbers: true
	},
	pool: { min: 0, max: 10 },
	migrations: { directory: './migrations', extension: 'ts', loadExtensions: ['.ts'] },
	seeds: { directory: './seeds', extension: 'ts', loadExtensions: ['.ts'] }
};

export default knexConfig;
