import type { Knex } from 'knex';

// Breakpoints saved against an immutable circuit version, in the shapes of the workbench's
// BreakpointSpec (gate, block boundary, divergence or entanglement condition), with a markdown
// note kept both as typed and as sanitised HTML; and a thread of comments on each.
export async function up(knex: Knex): Promise<void> {
	await knex.schema.createTable('breakpoints', (t) => {
		t.string('id', 24).primary();
		t.string('team_id', 24).notNullable().references('id').inTable('teams').onDelete('CASCADE');
		t.string('circuit_id', 24).notNullable().references('id').inTable('circuits').onDelete('CASCADE');
		t.string('circuit_version_id', 24).notNullable().references('id').inTable('circuit_versions').onDelete('CASCADE');
		t.enum('kind', ['gate', 'block', 'divergence', 'entangled']).notNullable();
		/** The BreakpointSpec without its id and note. */
		t.json('spec').notNullable();
		t.text('note_md').notNullable();
		t.text('note_html').notNullable();
		t.string('author_id', 24).nullable().references('id').inTable('users').onDelete('SET NULL');
		/** Bumped on every note edit; an edit based on an older revision is refused (409). */
		t.integer('revision').unsigned().notNullable().defaultTo(1);
		t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
		t.datetime('updated_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
		t.index(['circuit_version_id', 'created_at']);
	});
	await knex.schema.createTable('breakpoint_comments', (t) => {
		t.string('id', 24).primary();
		t.string('breakpoint_id', 24).notNullable().references('id').inTable('breakpoints').onDelete('CASCADE');
		t.string('author_id', 24).nullable().references('id').inTable('users').onDelete('SET NULL');
		t.text('body_md').notNullable();
		t.text('body_html').notNullable();
		t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
		t.index(['breakpoint_id', 'created_at']);
	});
}

export async function down(knex: Knex): Promise<void> {
	await knex.schema.dropTable('breakpoint_comments');
	await knex.schema.dropTable('breakpoints');
}
