import type { Knex } from 'knex';

// Safe to run again: upserts one row.
export async function seed(knex: Knex): Promise<void> {
	await knex('app_meta')
		.insert({ key: 'demo_seeded', value: 'yes' })
		.onConflict('key')
		.merge({ value: 'yes', updated_at: knex.fn.now(3) });
}
