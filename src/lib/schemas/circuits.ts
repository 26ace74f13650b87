import { z } from 'zod';
import { MAX_TEMPLATE_BITS, TEMPLATE_NAMES, TEMPLATES } from '$lib/quantum/templates';
import { parseRegisterMapEntry, RegisterMapError } from '$lib/quantum/qasm/register-map';

export const newCircuitSchema = z
	.object({
		title: z.string().trim().min(1, 'Give the circuit a title.').max(120, 'At most 120 characters.'),
		template: z.enum(TEMPLATE_NAMES, { message: 'Pick a starting point.' }),
		bits: z.coerce.number({ message: 'A whole number.' }).int('A whole number.').min(1, 'At least 1 bit.').max(MAX_TEMPLATE_BITS, `At most ${MAX_TEMPLATE_BITS} bits for a template.`)
	})
	.superRefine((v, ctx) => {
		const t = TEMPLATES.find((x) => x.name === v.template);
		if (t && v.bits > t.maxBits) ctx.addIssue({ code: 'custom', path: ['bits'], message: `At most ${t.maxBits} bits for the ${t.title.toLowerCase()} (it grows fastest).` });
	});

export const circuitIdSchema = z.object({ id: z.string().regex(/^[a-z2-7]{24}$/, 'Not a circuit id.') });

/** Largest uploaded circuit file, in bytes. */
export const MAX_CIRCUIT_UPLOAD = 2 * 1024 * 1024;

/** Most register-map fields the upload form sends. */
export const MAX_REGISTER_MAP_FIELDS = 64;

/**
 * The upload form's register map: the `register` fields in order, each `NAME=QUBITS` with the
 * syntax of the command line's `--register` (`x=q[0:3]`, `y=q[7:-1:4]`); blank fields are skipped.
 * An error's path is the field's position, so the form shows it under that field (`register-K`).
 */
export const uploadRegisterMapSchema = z
	.array(z.string().max(2000, 'At most 2000 characters.'))
	.max(MAX_REGISTER_MAP_FIELDS, `At most ${MAX_REGISTER_MAP_FIELDS} registers.`)
	.superRefine((fields, ctx) => {
		fields.forEach((text, k) => {
			if (!text.trim()) return;
			try {
				parseRegisterMapEntry(text.trim(), k);
			} catch (e) {
				ctx.addIssue({ code: 'custom', path: [k], message: e instanceof RegisterMapError ? e.message : String(e) });
			}
		});
	})
	.transform((fields) => fields.flatMap((text, field) => (text.trim() ? [{ field, entry: parseRegisterMapEntry(text.trim(), field) }] : [])));
