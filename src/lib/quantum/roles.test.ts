import { describe, expect, it } from 'vitest';
import { rolesFromSpecs } from './roles';

// Roles follow the spec's own words (an assigned register is written, a read one is only read):
// the definitions of src/lib/quantum/check/spec.ts, not a published source.
describe('rolesFromSpecs', () => {
	const imported = [
		{ name: 'a', size: 3, role: 'work' as const },
		{ name: 'b', size: 3, role: 'work' as const },
		{ name: 'anc', size: 1, role: 'ancilla' as const },
		{ name: 'spare', size: 2 }
	];

	it('gives an assigned register "output" and a read one "input"', () => {
		const got = rolesFromSpecs(imported, ['b = a + b mod 8']);
		expect(got.registers.map((r) => r.role)).toEqual(['input', 'output', 'ancilla', undefined]);
		expect(got.changed).toEqual(['a: input', 'b: output']);
	});

	it('keeps a role a person chose and leaves registers no spec mentions alone', () => {
		const chosen = [{ name: 'a', size: 3, role: 'output' as const }, { name: 'b', size: 3 }, { name: 'spare', size: 1, role: 'work' as const }];
		const got = rolesFromSpecs(chosen, ['b = a + b mod 8']);
		expect(got.registers).toEqual([{ name: 'a', size: 3, role: 'output' }, { name: 'b', size: 3, role: 'output' }, { name: 'spare', size: 1, role: 'work' }]);
		expect(got.changed).toEqual(['b: output']);
	});

	it('skips a spec line that does not parse and changes nothing without specs', () => {
		expect(rolesFromSpecs(imported, ['b = = a']).changed).toEqual([]);
		expect(rolesFromSpecs(imported, []).registers).toEqual(imported);
	});
});
