// The upload form's register map (uploadRegisterMapSchema): the fields as the command line's
// --register, blank ones skipped, each error under its own field's position. Invented field values.
import { describe, expect, it } from 'vitest';
import { MAX_REGISTER_MAP_FIELDS, uploadRegisterMapSchema } from './circuits';

describe('uploadRegisterMapSchema', () => {
	it('keeps each entry with the position of its field, skipping blank fields', () => {
		const r = uploadRegisterMapSchema.safeParse(['x=q[0:2]', '  ', ' y = q[5:-1:3] ']);
		expect(r.success).toBe(true);
		expect(r.data).toEqual([
			{ field: 0, entry: { name: 'x', qubits: 'q[0:2]' } },
			{ field: 2, entry: { name: 'y', qubits: 'q[5:-1:3]' } }
		]);
	});
	it('reports a bad entry under its field, in the words of --register', () => {
		const r = uploadRegisterMapSchema.safeParse(['x=q[0:2]', '', '2y=q[3]', 'z']);
		expect(r.success).toBe(false);
		expect(r.error!.issues.map((i) => [i.path[0], i.message])).toEqual([
			[2, '"2y=q[3]": register name "2y" must be an identifier (letters, digits, _; not starting with a digit)'],
			[3, '"z": expected NAME=QUBITS such as x=q[0:15], x=q[15:-1:0] or x=q[{3,1,2,0}]']
		]);
	});
	it('bounds the number of fields and their length', () => {
		expect(uploadRegisterMapSchema.safeParse(Array.from({ length: MAX_REGISTER_MAP_FIELDS + 1 }, (_, k) => `r${k}=q[${k}]`)).success).toBe(false);
		expect(uploadRegisterMapSchema.safeParse([`x=q[{${'1,'.repeat(1500)}1}]`]).success).toBe(false);
	});
});
