import type { Knex } from 'knex';

// Each person decides whether report events (new reports naming them, comments, status changes)
// reach them by mail. On unless they turn it off on the account page.
export async function up(knex: Knex): Promise<void> {
	await knex.schema.alterTable('users', (t) => {
		t.boolean('mail_report_events').notNullable().defaultTo(true);
	});
}

export async function down(knex: Knex): Promise<void> {
	await knex.schema.alterTable('users', (t) => {
		t.dropColumn('mail_report_events');
	});
}
