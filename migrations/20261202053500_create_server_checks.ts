import type { Knex } from 'knex';

// Checks run by the server's workers (BullMQ on Redis). A check is one verdict on one immutable
// circuit version: proof and sweep as the version's specs say. A large sweep is split into shards;
// each shard's result is one row keyed by (check, shard), written at most once, so a shard run
// twice (its worker died and the queue retried it) is never counted twice.
//
// The circuits table used to carry last_check_* columns filled from whatever a client posted: that
// verdict was the caller's word. They go; circuits.check_id points at the latest server check.
export async function up(knex: Knex): Promise<void> {
	await knex.schema.createTable('checks', (t) => {
		t.string('id', 24).primary();
		t.string('team_id', 24).notNullable().references('id').inTable('teams').onDelete('CASCADE');
		t.string('circuit_id', 24).notNullable().references('id').inTable('circuits').onDelete('CASCADE');
		t.string('circuit_version_id', 24).notNullable().references('id').inTable('circuit_versions').onDelete('CASCADE');
		t.integer('version').unsigned().notNullable();
		t.string('requested_by', 24).nullable().references('id').inTable('users').onDelete('SET NULL');
		/** What queued it: save, create, upload, push, seed, request (someone pressed "check again"). */
		t.string('reason', 16).notNullable();
		t.enum('status', ['queued', 'running', 'pass', 'fail', 'error', 'cancelled']).notNullable().defaultTo('queued');
		t.string('method', 16).nullable();
		t.string('engine', 40).nullable();
		t.string('proof_status', 16).nullable();
		/** Inputs the sweep covers (2^bits for an exhaustive sweep, the sample size otherwise). */
		t.bigInteger('inputs_total').unsigned().notNullable().defaultTo(0);
		t.bigInteger('cases').unsigned().notNullable().defaultTo(0);
		t.bigInteger('failed').unsigned().notNullable().defaultTo(0);
		t.boolean('exhaustive').notNullable().defaultTo(false);
		t.double('worst_probability').nullable();
		t.integer('shards_total').unsigned().notNullable().defaultTo(0);
		t.integer('duration_ms').unsigned().nullable();
		t.string('worker_host', 255).nullable();
		/** A sentence for the reader: why it stopped, what a limit cut. */
		t.string('message', 500).nullable();
		/** failures, wrongTerms, suspects, notes, specs, domain: the report minus what has columns. */
		t.json('result').nullable();
		t.string('cancelled_by', 24).nullable().references('id').inTable('users').onDelete('SET NULL');
		t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
		t.datetime('started_at', { precision: 3 }).nullable();
		t.datetime('finished_at', { precision: 3 }).nullable();
		t.index(['circuit_id', 'created_at']);
		t.index(['team_id', 'status']);
	});
	await knex.schema.createTable('check_shards', (t) => {
		t.string('check_id', 24).notNullable().references('id').inTable('checks').onDelete('CASCADE');
		t.integer('shard').unsigned().notNullable();
		t.bigInteger('range_start').unsigned().notNullable();
		t.bigInteger('range_end').unsigned().notNullable();
		t.bigInteger('cases').unsigned().notNullable();
		t.bigInteger('failed').unsigned().notNullable();
		t.double('worst_probability').notNullable();
		t.json('failures').notNullable();
		t.json('engines').notNullable();
		/** Distinct global-phase references of the shard's chunks (the merge fails a check whose parts disagree). */
		t.json('phase_references').notNullable();
		t.string('worker_host', 255).notNullable();
		t.integer('duration_ms').unsigned().notNullable();
		t.datetime('finished_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
		t.primary(['check_id', 'shard']);
	});
	await knex.schema.alterTable('circuits', (t) => {
		t.string('check_id', 24).nullable().references('id').inTable('checks').onDelete('SET NULL');
		t.dropColumn('last_check_status');
		t.dropColumn('last_check_summary');
		t.dropColumn('last_checked_at');
	});
}

export async function down(knex: Knex): Promise<void> {
	await knex.schema.alterTable('circuits', (t) => {
		t.dropForeign(['check_id']);
		t.dropColumn('check_id');
		t.enum('last_check_status', ['pass', 'fail', 'error']).nullable();
		t.string('last_check_summary', 255).nullable();
		t.timestamp('last_checked_at', { precision: 3 }).nullable();
	});
	await knex.schema.dropTable('check_shards');
	await knex.schema.dropTable('checks');
}
