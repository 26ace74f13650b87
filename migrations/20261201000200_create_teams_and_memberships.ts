import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
	await knex.schema.createTable('teams', (t) => {
		t.string('id', 24).primary();
		t.string('slug', 64).notNullable().unique();
		t.string('name', 80).notNullable();
		t.string('created_by', 24).nullable().references('users.id').onDelete('SET NULL');
		t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
	});
	await knex.schema.createTable('memberships', (t) => {
		t.string('team_id', 24).notNullable().references('teams.id').onDelete('CASCADE');
		t.string('user_id', 24).notNullable().references('users.id').onDelete('CASCADE');
		t.enum('role', ['owner', 'engineer', 'reviewer', 'viewer']).notNullable();
		t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
		t.datetime('updated_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
		t.primary(['team_id', 'user_id']);
		t.index(['user_id']);
	});
}

export async function down(knex: Knex): Promise<void> {
	await knex.schema.dropTable('memberships');
	await knex.schema.dropTable('teams');
}
