import { describe, expect, it } from 'vitest';
import { newCircuitSchema } from './circuits';
import { lowerCircuit } from '$lib/quantum/lower';
import { makeTemplate, templateLabel } from '$lib/quantum/templates';

// The new-circuit form takes what the landing page promises (a 32-bit multiplier, proved) and
// refuses sizes a template cannot be stepped at on the server (50,000 lowered gates).
describe('new circuit form', () => {
	const parse = (template: string, bits: number) => newCircuitSchema.safeParse({ title: 't', template, bits: String(bits) });

	it('takes a 32-bit multiplier and refuses 33 bits, naming the field', () => {
		expect(parse('multiplier', 32).success).toBe(true);
		const r = parse('multiplier', 33);
		expect(r.success).toBe(false);
		expect(r.error?.issues[0]).toMatchObject({ path: ['bits'], message: 'At most 32 bits for a template.' });
	});

	it('caps the controlled modular multiplier at 24 bits, where it still lowers under the server limit', () => {
		expect(parse('modular-multiplier', 24).success).toBe(true);
		const r = parse('modular-multiplier', 25);
		expect(r.error?.issues[0]).toMatchObject({ path: ['bits'] });
		expect(r.error?.issues[0].message).toMatch(/At most 24 bits/);
		expect(lowerCircuit(makeTemplate('modular-multiplier', 'm', 24)).gateCount).toBeLessThanOrEqual(50_000);
	});

	it('labels say the chosen size', () => {
		expect(templateLabel('adder', 5)).toBe('5-bit Fourier adder');
		expect(templateLabel('multiplier', 32)).toBe('32-bit multiplier');
		expect(templateLabel('modular-adder', 5)).toBe('Modular adder');
	});
});
