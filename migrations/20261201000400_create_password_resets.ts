import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
	await knex.schema.createTable('password_resets', (t) => {
		t.string('id', 24).primary();
		t.string('user_id', 24).notNullable().references('users.id').onDelete('CASCADE');
		t.specificType('token_hash', 'CHAR(64)').notNullable().unique();
		t.datetime('expires_at', { precision: 3 }).notNullable();
		t.datetime('used_at', { precision: 3 }).nullable();
		t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
		t.index(['user_id']);
	});
}

export async function down(knex: Knex): Promise<void> {
	await knex.schema.dropTable('password_resets');
}
