import { z } from 'zod';
import { TEMPLATE_NAMES } from '$lib/quantum/templates';

export const newCircuitSchema = z.object({
	title: z.string().trim().min(1, 'Give the circuit a title.').max(120, 'At most 120 characters.'),
	template: z.enum(TEMPLATE_NAMES, { message: 'Pick a starting point.' }),
	bits: z.coerce.number({ message: 'A whole number.' }).int('A whole number.').min(1, 'At least 1 bit.').max(16, 'At most 16 bits for a template.')
});

export const circuitIdSchema = z.object({ id: z.string().regex(/^[a-z2-7]{24}$/, 'Not a circuit id.') });

/** Largest uploaded circuit file, in bytes. */
export const MAX_CIRCUIT_UPLOAD = 2 * 1024 * 1024;
