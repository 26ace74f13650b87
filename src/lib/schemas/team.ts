import { z } from 'zod';
import { ROLES } from '../permissions';
import { email } from './auth';

const role = z.enum(ROLES, { error: 'Pick a role.' });

export const teamName = z
	.string({ error: 'Name the team.' })
	.trim()
	.min(2, 'Use at least 2 characters.')
	.max(80, 'Keep it under 80 characters.')
	.refine((s) => /[\p{L}\p{N}]/u.test(s), 'Use at least one letter or digit.');

export const createTeamSchema = z.object({ name: teamName });
export type CreateTeamInput = z.infer<typeof createTeamSchema>;

export const inviteSchema = z.object({ email, role });
export type InviteInput = z.infer<typeof inviteSchema>;

export const changeRoleSchema = z.object({ userId: z.string().min(1).max(40), role });
export const memberRefSchema = z.object({ userId: z.string().min(1).max(40) });
export const invitationRefSchema = z.object({ invitationId: z.string().min(1).max(40) });

export const createTokenSchema = z.object({
	name: z
		.string({ error: 'Name the token, e.g. after the CI job that uses it.' })
		.trim()
		.min(1, 'Name the token, e.g. after the CI job that uses it.')
		.max(80, 'Keep it under 80 characters.'),
	role
});
export const tokenRefSchema = z.object({ tokenId: z.string().min(1).max(40) });
