import { describe, expect, it } from 'vitest';
import { parseCircuitDocument } from './schema';
import { upgradeLegacyDocument } from './legacy';
import { CIRCUIT_FORMAT } from './circuit';

// A document as the demo seeds wrote it before the rename (invented demo data).
const old = {
	format: 'phasewright.circuit',
	version: 1,
	title: 'old adder',
	registers: [{ name: 'a', size: 2 }, { name: 'b', size: 2 }],
	body: [{ id: 'g1', type: 'gate', gate: 'h', qubits: [{ register: 'b', index: 0 }] }]
};

describe('documents saved under the old name', () => {
	it('are read and rewritten to the current format name', () => {
		const r = parseCircuitDocument(old);
		expect(r.ok).toBe(true);
		if (r.ok) expect(r.document.format).toBe(CIRCUIT_FORMAT);
	});
	it('leave other values alone', () => {
		const cur = { ...old, format: CIRCUIT_FORMAT };
		expect(upgradeLegacyDocument(cur)).toBe(cur);
		expect(upgradeLegacyDocument([1])).toEqual([1]);
		expect(parseCircuitDocument({ ...old, format: 'other.circuit' }).ok).toBe(false);
	});
});
