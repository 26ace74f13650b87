import { error } from '@sveltejs/kit';
import { db } from '$lib/server/db';
import { formFailure, parseForm } from '$lib/server/forms';
import { requireTeamRole } from '$lib/server/guard';
import { createApiToken, findActiveToken, listActiveTokens, revokeApiToken } from '$lib/server/repositories/api-tokens';
import { createTokenSchema, tokenRefSchema } from '$lib/schemas/team';
import { atLeast, can, grantableTokenRoles } from '$lib/permissions';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async ({ locals, params, url }) => {
	const { team, role, user } = await requireTeamRole(locals, params.slug, 'team.view', { redirectFrom: url });
	const seeAll = can(role, 'token.revoke_any');
	const tokens = (await listActiveTokens(db, team.id, seeAll ? undefined : user.id)).map((t) => ({
		id: t.id,
		name: t.name,
		role: t.role,
		hint: t.hint,
		creator: t.creator_name,
		mine: t.user_id === user.id,
		createdAt: new Date(t.created_at).toISOString(),
		lastUsedAt: t.last_used_at ? new Date(t.last_used_at).toISOString() : null
	}));
	return { tokens, grantable: can(role, 'token.create') ? grantableTokenRoles(role) : [] };
};

export const actions: Actions = {
	create: async ({ locals, params, request }) => {
		const { team, role, user } = await requireTeamRole(locals, params.slug, 'token.create');
		const form = await parseForm(request, createTokenSchema);
		if (!form.ok) return form.failure;
		if (!atLeast(role, form.data.role)) {
			return formFailure(400, 'A token cannot have more rights than you have yourself.', form.raw, 'role');
		}
		const { id, secret } = await createApiToken(db, { teamId: team.id, userId: user.id, name: form.data.name, role: form.data.role });
		// The only time the secret leaves the server.
		return { created: { id, name: form.data.name, role: form.data.role, secret } };
	},
	revoke: async ({ locals, params, request }) => {
		const { team, role, user } = await requireTeamRole(locals, params.slug, 'team.view');
		const form = await parseForm(request, tokenRefSchema);
		if (!form.ok) return form.failure;
		const token = await findActiveToken(db, team.id, form.data.tokenId);
		if (!token) error(404, { message: 'No such active token in this team.', code: 'not_found' });
		if (token.user_id !== user.id && !can(role, 'token.revoke_any')) {
			error(403, { message: 'Only its creator or a team owner can revoke this token.', code: 'forbidden' });
		}
		await revokeApiToken(db, token.id);
		return { revoked: true };
	}
};
