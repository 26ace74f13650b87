import type { Knex } from 'knex';

// Ids are 24-character base32 strings made in code ($lib/server/ids.ts). Times are UTC DATETIME(3),
// written by the app (the connection's timezone is 'Z').
export async function up(knex: Knex): Promise<void> {
	await knex.schema.createTable('users', (t) => {
		t.string('id', 24).primary();
		t.string('email', 254).notNullable().unique();
		t.string('name', 80).notNullable();
		t.string('password_hash', 255).notNullable();
		t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
		t.datetime('updated_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
	});
	await knex.schema.createTable('sessions', (t) => {
		// lucia's session ids (40 base32 characters).
		t.string('id', 64).primary();
		t.string('user_id', 24).notNullable().references('users.id').onDelete('CASCADE');
		t.datetime('expires_at', { precision: 3 }).notNullable().index();
		t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
		t.index(['user_id']);
	});
}

export async function down(knex: Knex): Promise<void> {
	await knex.schema.dropTable('sessions');
	await knex.schema.dropTable('users');
}
