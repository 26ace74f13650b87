import knex, { type Knex } from 'knex';
import knexConfig from '../../../knexfile';

/** The server's connection pool. One per process; per-request state never lives here. */
export const db: Knex = knex(knexConfig);

export type Db = Knex | Knex.Transaction;
