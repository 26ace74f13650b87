import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
	await knex.schema.createTable('api_tokens', (t) => {
		t.string('id', 24).primary();
		t.string('team_id', 24).notNullable().references('teams.id').onDelete('CASCADE');
		t.string('user_id', 24).notNullable().references('users.id').onDelete('CASCADE');
		t.string('name', 80).notNullable();
		t.enum('role', ['owner', 'engineer', 'reviewer', 'viewer']).notNullable();
		t.specificType('token_hash', 'CHAR(64)').notNullable().unique();
		/** The last four characters, so people can tell their tokens apart. */
		t.string('hint', 8).notNullable();
		t.datetime('last_used_at', { precision: 3 }).nullable();
		t.datetime('revoked_at', { precision: 3 }).nullable();
		t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
		t.index(['team_id', 'revoked_at']);
		t.index(['user_id']);
	});
}

export async function down(knex: Knex): Promise<void> {
	await knex.schema.dropTable('api_tokens');
}
