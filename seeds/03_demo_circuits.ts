import type { Knex } from 'knex';
import { createHash } from 'node:crypto';
import { newId } from '../src/lib/server/ids';
import { demoMultiplier, periodFinding, periodFindingUnreduced, plantedFaultAdder } from '../src/lib/quantum/templates';
import { lowerCircuit } from '../src/lib/quantum/lower';
import type { CircuitDocument } from '../src/lib/quantum/circuit';

// Demo circuits for the invented Halvorsen Phase Lab, so a first visit has something to step
// and something to debug. Safe to run again: a circuit with the same title is left alone.

const DEMOS: { make: () => CircuitDocument; author: string; message: string }[] = [
	{ make: demoMultiplier, author: 'tomas@halvorsen-lab.example', message: 'multiplier for the lab’s period-finding study' },
	{ make: plantedFaultAdder, author: 'tomas@halvorsen-lab.example', message: 'hand-written controlled adder (has a bug to find)' },
	{ make: () => periodFinding(), author: 'tomas@halvorsen-lab.example', message: 'modular exponentiation for the lab’s period-finding run, 2^e mod 21' },
	{ make: periodFindingUnreduced, author: 'tomas@halvorsen-lab.example', message: 'copy of the period-finding circuit with the constants typed in by hand (one is off: find it)' }
];

export async function seed(knex: Knex): Promise<void> {
	const team = await knex('teams').where({ slug: 'halvorsen-lab' }).first('id');
	if (!team) return;
	for (const d of DEMOS) {
		const doc = d.make();
		if (await knex('circuits').where({ team_id: team.id, title: doc.title }).first('id')) continue;
		const author = await knex('users').where({ email: d.author }).first('id');
		const id = newId();
		const text = JSON.stringify(doc, null, 2);
		await knex('circuits').insert({
			id,
			team_id: team.id,
			title: doc.title,
			created_by: author?.id ?? null,
			latest_version: 1,
			register_summary: doc.registers.map((r) => `${r.name}[${r.size}]`).join(' '),
			gate_count: lowerCircuit(doc).gateCount
		});
		await knex('circuit_versions').insert({
			id: newId(),
			circuit_id: id,
			version: 1,
			document: text,
			hash: createHash('sha256').update(text).digest('hex'),
			message: d.message,
			created_by: author?.id ?? null
		});
	}
}
