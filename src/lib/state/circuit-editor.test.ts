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
