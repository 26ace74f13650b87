import type { Knex } from 'knex';

// Bug reports opened from the workbench at one step of a saved trace, with a snapshot, an
// assignee and a reviewer; status open → confirmed → fixed → verified (or won't fix), every
// change also written to audit_log. Comments form the thread.
export async function up(knex: Knex): Promise<void> {
	await knex.schema.createTable('reports', (t) => {
		t.string('id', 24).primary();
		t.string('team_id', 24).notNullable().references('id').inTable('teams').onDelete('CASCADE');
		t.string('trace_id', 24).notNullable().references('id').inTable('traces').onDelete('CASCADE');
		t.string('circuit_id', 24).notNullable().references('id').inTable('circuits').onDelete('CASCADE');
		t.integer('step').unsigned().notNullable();
		t.string('title', 160).notNullable();
		t.text('description_md').notNullable();
		t.text('description_html').notNullable();
		t.enum('severity', ['low', 'medium', 'high', 'critical']).notNullable();
		t.enum('status', ['open', 'confirmed', 'fixed', 'verified', 'wont_fix']).notNullable().defaultTo('open');
		t.string('author_id', 24).nullable().references('id').inTable('users').onDelete('SET NULL');
		t.string('assignee_id', 24).nullable().references('id').inTable('users').onDelete('SET NULL');
		t.string('reviewer_id', 24).nullable().references('id').inTable('users').onDelete('SET NULL');
		t.string('snapshot_id', 24).nullable().references('id').inTable('attachments').onDelete('SET NULL');
		/** Bumped on every change; a change based on an older revision is refused (409). */
		t.integer('revision').unsigned().notNullable().defaultTo(1);
		t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
		t.datetime('updated_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
		t.index(['team_id', 'status']);
		t.index(['team_id', 'assignee_id']);
		t.index(['team_id', 'circuit_id']);
	});
	await knex.schema.createTable('report_comments', (t) => {
		t.string('id', 24).primary();
		t.string('report_id', 24).notNullable().references('id').inTable('reports').onDelete('CASCADE');
		t.string('author_id', 24).nullable().references('id').inTable('users').onDelete('SET NULL');
		t.text('body_md').notNullable();
		t.text('body_html').notNullable();
		t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
		t.index(['report_id', 'created_at']);
	});
}

export async function down(knex: Knex): Promise<void> {
	await knex.schema.dropTable('report_comments');
	await knex.schema.dropTable('reports');
}
