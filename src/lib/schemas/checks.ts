import { z } from 'zod';

// A version to check (POST …/circuits/[id]/checks). The old body that carried a client's verdict
// (ok, cases, failed, …, still sent by the command line's push) is taken only as "reported by the
// command line": it never sets the verdict; the server queues its own check of that version.
export const checkRequestSchema = z.object({
	version: z.number().int().min(1).optional(),
	ok: z.boolean().optional(),
	method: z.string().max(32).optional(),
	cases: z.number().int().min(0).optional(),
	failed: z.number().int().min(0).optional(),
	exhaustive: z.boolean().optional()
});
export type CheckRequest = z.input<typeof checkRequestSchema>;
