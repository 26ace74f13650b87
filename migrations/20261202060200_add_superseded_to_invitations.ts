import type { Knex } from 'knex';

// "Send again" replaces a pending invitation with a fresh link; the old row is kept, marked as
// superseded, so its link can say so plainly instead of "not valid".
export async function up(knex: Knex): Promise<void> {
	await knex.schema.alterTable('invitations', (t) => {
		t.datetime('superseded_at', { precision: 3 }).nullable();
	});
}

export async function down(knex: Knex): Promise<void> {
	await knex.schema.alterTable('invitations', (t) => {
		t.dropColumn('superseded_at');
	});
}
