import knex, { type Knex } from 'knex';
import knexConfig from '../../../knexfile';
import { onShutdown } from './shutdown';

/** The server's connection pool. One per process; per-request state never lives here. */
export const db: Knex = knex(knexConfig);
onShutdown('database pool', () => db.destroy());

export type Db = Knex | Knex.Transaction;
