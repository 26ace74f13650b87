import type { Knex } from 'knex';

// A trace is one saved run: an immutable circuit version, its inputs and engine, a summary (final
// register values, first divergence) and the keyframe checksums a replay must reproduce.
export async function up(knex: Knex): Promise<void> {
	await knex.schema.createTable('traces', (t) => {
		t.string('id', 24).primary();
		t.string('team_id', 24).notNullable().references('id').inTable('teams').onDelete('CASCADE');
		t.string('circuit_id', 24).notNullable().references('id').inTable('circuits').onDelete('CASCADE');
		t.string('circuit_version_id', 24).notNullable().references('id').inTable('circuit_versions').onDelete('CASCADE');
		/** Denormalised from circuit_versions so the table can show it without a join. */
		t.integer('version').unsigned().notNullable();
		t.string('author_id', 24).nullable().references('id').inTable('users').onDelete('SET NULL');
		t.string('label', 160).notNullable().defaultTo('');
		t.enum('engine', ['ledger', 'amplitudes']).notNullable();
		t.json('inputs').notNullable();
		t.json('summary').notNullable();
		t.boolean('diverged').notNullable();
		t.integer('divergence_step').unsigned().nullable();
		t.integer('divergence_qubit').unsigned().nullable();
		t.string('divergence_label', 80).nullable();
		t.integer('gate_count').unsigned().notNullable();
		t.integer('last_step').unsigned().notNullable();
		t.json('keyframe_checksums').notNullable();
		/** Who computed the summary and checksums: the browser's worker or the server (CLI uploads). */
		t.enum('computed_by', ['browser', 'server']).notNullable();
		t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
		t.index(['team_id', 'created_at']);
		t.index(['team_id', 'circuit_id']);
		t.index(['team_id', 'author_id']);
	});
}

export async function down(knex: Knex): Promise<void> {
	await knex.schema.dropTable('traces');
}
