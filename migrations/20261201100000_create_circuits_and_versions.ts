import type { Knex } from 'knex';

// A circuit is a named thing in a team; its content lives in immutable versions (JSON document +
// sha-256 of its canonical text). Saving makes version latest+1 only when the client's base is
// still the latest: a stale save is refused (409) instead of overwriting.
export async function up(knex: Knex): Promise<void> {
	await knex.schema.createTable('circuits', (t) => {
		t.string('id', 24).primary();
		t.string('team_id', 24).notNullable().references('id').inTable('teams').onDelete('CASCADE');
		t.string('title', 120).notNullable();
		t.string('created_by', 24).nullable().references('id').inTable('users').onDelete('SET NULL');
		t.integer('latest_version').unsigned().notNullable().defaultTo(0);
		t.string('register_summary', 255).notNullable().defaultTo('');
		t.integer('gate_count').unsigned().notNullable().defaultTo(0);
		t.enum('last_check_status', ['pass', 'fail', 'error']).nullable();
		t.string('last_check_summary', 255).nullable();
		t.timestamp('last_checked_at', { precision: 3 }).nullable();
		t.timestamp('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
		t.timestamp('updated_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
		t.index(['team_id', 'updated_at']);
	});
	await knex.schema.createTable('circuit_versions', (t) => {
		t.string('id', 24).primary();
		t.string('circuit_id', 24).notNullable().references('id').inTable('circuits').onDelete('CASCADE');
		t.integer('version').unsigned().notNullable();
		t.json('document').notNullable();
		t.string('hash', 64).notNullable();
		t.string('message', 255).notNullable().defaultTo('');
		t.string('created_by', 24).nullable().references('id').inTable('users').onDelete('SET NULL');
		t.timestamp('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
		t.unique(['circuit_id', 'version']);
	});
}

export async function down(knex: Knex): Promise<void> {
	await knex.schema.dropTable('circuit_versions');
	await knex.schema.dropTable('circuits');
}
