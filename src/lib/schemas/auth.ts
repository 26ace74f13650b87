import { z } from 'zod';

// Shared by the forms and the server. No server imports here.

export const email = z
	.string({ error: 'Enter your e-mail address.' })
	.trim()
	.toLowerCase()
	.max(254, 'That address is too long.')
	.pipe(z.email({ error: 'That does not look like an e-mail address.' }));

/** Long passphrases welcome; the upper bound only keeps hashing time bounded. */
export const newPassword = z
	.string({ error: 'Choose a password.' })
	.min(10, 'Use at least 10 characters.')
	.max(200, 'Use at most 200 characters.');

export const personName = z
	.string({ error: 'Tell us what to call you.' })
	.trim()
	.min(1, 'Tell us what to call you.')
	.max(80, 'Keep it under 80 characters.');

export const signUpSchema = z.object({ name: personName, email, password: newPassword });
export type SignUpInput = z.infer<typeof signUpSchema>;

export const signInSchema = z.object({
	email,
	password: z.string({ error: 'Enter your password.' }).min(1, 'Enter your password.').max(200, 'Enter your password.')
});
export type SignInInput = z.infer<typeof signInSchema>;

export const resetRequestSchema = z.object({ email });

export const resetPasswordSchema = z
	.object({ password: newPassword, confirm: z.string() })
	.refine((v) => v.password === v.confirm, { path: ['confirm'], message: 'The two passwords differ.' });

/** Sign-up through an invitation: the address comes from the invitation, not the form. */
export const inviteSignUpSchema = z.object({ name: personName, password: newPassword });
