import type { Knex } from 'knex';

// The picture a report opens with when it came without a snapshot (the command line): the dial
// board at the report's step, drawn on the server as SVG from a fresh run of the saved trace, and
// the ledger excerpt of the qubit that step is about.
export async function up(knex: Knex): Promise<void> {
	await knex.schema.alterTable('reports', (t) => {
		t.specificType('board_svg', 'MEDIUMTEXT').nullable();
		t.json('board_ledger').nullable();
	});
}

export async function down(knex: Knex): Promise<void> {
	await knex.schema.alterTable('reports', (t) => {
		t.dropColumn('board_ledger');
		t.dropColumn('board_svg');
	});
}
