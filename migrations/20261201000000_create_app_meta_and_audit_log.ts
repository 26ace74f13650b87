import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
	await knex.schema.createTable('app_meta', (t) => {
		t.string('key', 64).primary();
		t.text('value').notNullable();
		t.timestamp('updated_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
	});
	await knex.schema.createTable('audit_log', (t) => {
		t.bigIncrements('id');
		t.string('actor_id', 40).nullable().index();
		t.string('team_id', 40).nullable().index();
		t.string('action', 64).notNullable();
		t.string('subject_type', 40).nullable();
		t.string('subject_id', 64).nullable();
		t.json('detail').nullable();
		t.timestamp('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
		t.index(['subject_type', 'subject_id']);
	});
}

export async function down(knex: Knex): Promise<void> {
	await knex.schema.dropTable('audit_log');
	await knex.schema.dropTable('app_meta');
}
