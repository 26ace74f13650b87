import type { Knex } from 'knex';

// Frame snapshots (PNG) kept in the database itself: one service fewer than an object store,
// written in the same transaction as the report that shows them, and small (capped at 5 MiB).
export async function up(knex: Knex): Promise<void> {
	await knex.schema.createTable('attachments', (t) => {
		t.string('id', 24).primary();
		t.string('team_id', 24).notNullable().references('id').inTable('teams').onDelete('CASCADE');
		t.string('content_type', 64).notNullable();
		t.integer('byte_size').unsigned().notNullable();
		t.integer('width').unsigned().nullable();
		t.integer('height').unsigned().nullable();
		t.specificType('sha256', 'CHAR(64)').notNullable();
		t.specificType('bytes', 'MEDIUMBLOB').notNullable();
		t.string('created_by', 24).nullable().references('id').inTable('users').onDelete('SET NULL');
		t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
		t.index(['team_id']);
	});
}

export async function down(knex: Knex): Promise<void> {
	await knex.schema.dropTable('attachments');
}
