import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
	await knex.schema.createTable('invitations', (t) => {
		t.string('id', 24).primary();
		t.string('team_id', 24).notNullable().references('teams.id').onDelete('CASCADE');
		t.string('email', 254).notNullable();
		t.enum('role', ['owner', 'engineer', 'reviewer', 'viewer']).notNullable();
		// sha-256 hex of the secret in the link; the secret itself is only in the e-mail.
		t.specificType('token_hash', 'CHAR(64)').notNullable().unique();
		t.string('invited_by', 24).nullable().references('users.id').onDelete('SET NULL');
		t.datetime('expires_at', { precision: 3 }).notNullable();
		t.datetime('accepted_at', { precision: 3 }).nullable();
		t.string('accepted_by', 24).nullable().references('users.id').onDelete('SET NULL');
		t.datetime('revoked_at', { precision: 3 }).nullable();
		t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
		t.index(['team_id', 'accepted_at', 'revoked_at']);
	});
}

export async function down(knex: Knex): Promise<void> {
	await knex.schema.dropTable('invitations');
}
