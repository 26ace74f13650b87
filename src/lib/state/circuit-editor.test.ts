import { describe, expect, it } from 'vitest';
import { renameRegisterInItems } from './circuit-editor.svelte';
import type { BodyItem } from '$lib/quantum/circuit';

describe('register rename', () => {
	it('rewrites register fields and qubit references, and nothing else', () => {
		const items: BodyItem[] = [
			{ id: 'x1', type: 'add', addend: 'a', target: 'b', control: { register: 'a', index: 0 } },
			{ id: 'x2', type: 'gate', gate: 'cp', qubits: [{ register: 'a', index: 1 }, { register: 'b', index: 0 }], angle: 'pi/2' },
			{ id: 'a', type: 'qft', register: 'b' }
		];
		const out = renameRegisterInItems(items, 'a', 'x');
		expect(out[0]).toMatchObject({ addend: 'x', target: 'b', control: { register: 'x', index: 0 } });
		expect((out[1] as { qubits: { register: string }[] }).qubits.map((q) => q.register)).toEqual(['x', 'b']);
		// An item whose id happens to equal the old name keeps its id.
		expect(out[2].id).toBe('a');
	});
});

describe('making a block of strip items', () => {
	it('moves the items into a block called in their place, and the circuit lowers to the same gates', async () => {
		const { CircuitEditor } = await import('./circuit-editor.svelte');
		const { makeTemplate } = await import('$lib/quantum/templates');
		const { lowerCircuit } = await import('$lib/quantum/lower');
		const { gateAt } = await import('$lib/quantum/circuit');
		const before = makeTemplate('adder');
		const ed = new CircuitEditor(before, 1);
		expect(ed.makeBlock('add_into_b', 0, 2, 'QFT, add, inverse')).toBeNull();
		const after = ed.snapshot();
		expect(after.body).toHaveLength(1);
		expect(after.body[0]).toMatchObject({ type: 'call', block: 'add_into_b', args: { a: 'a', b: 'b' } });
		expect(after.blocks?.[0].params).toEqual([{ name: 'a', kind: 'register' }, { name: 'b', kind: 'register' }]);
		const x = lowerCircuit(before);
		const y = lowerCircuit(after);
		expect(y.gateCount).toBe(x.gateCount);
		for (let g = 0; g < x.gateCount; g++) expect(gateAt(y, g)).toEqual(gateAt(x, g));
		// Undo gives the items back.
		ed.undo();
		expect(ed.snapshot().body).toHaveLength(3);
	});

	it('refuses a bad name, a taken name and an empty range with a message', async () => {
		const { CircuitEditor } = await import('./circuit-editor.svelte');
		const { makeTemplate } = await import('$lib/quantum/templates');
		const ed = new CircuitEditor(makeTemplate('adder'), 1);
		expect(ed.makeBlock('9lives', 0, 0)).toMatch(/starts with a letter/);
		expect(ed.makeBlock('ok', 2, 1)).toMatch(/first not after last/);
		expect(ed.makeBlock('ok', 0, 0)).toBeNull();
		expect(ed.makeBlock('ok', 0, 0)).toMatch(/already a block called ok/);
	});
});
