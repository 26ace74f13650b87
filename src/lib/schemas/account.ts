import { z } from 'zod';
import { newPassword, personName } from './auth';

// The account page's forms (/account). Shared by the page and the server; no server imports.

const currentPassword = z.string({ error: 'Enter your current password.' }).min(1, 'Enter your current password.').max(200, 'Enter your current password.');

export const displayNameSchema = z.object({ name: personName });

export const passwordChangeSchema = z
	.object({ currentPassword, password: newPassword, confirm: z.string() })
	.refine((v) => v.password === v.confirm, { path: ['confirm'], message: 'The two passwords differ.' })
	.refine((v) => v.password !== v.currentPassword, { path: ['password'], message: 'Choose a password different from the current one.' });

/** A checkbox: present ("on") when ticked, absent when not. */
export const mailSettingsSchema = z.object({ reportMail: z.literal('on').optional() });

export const leaveTeamSchema = z.object({ team: z.string().trim().min(1, 'Pick a team.').max(80) });

export const deleteAccountSchema = z.object({
	currentPassword,
	confirm: z.literal('delete my account', { error: 'Type "delete my account" to confirm.' })
});

export type DisplayNameInput = z.infer<typeof displayNameSchema>;
export type PasswordChangeInput = z.infer<typeof passwordChangeSchema>;
