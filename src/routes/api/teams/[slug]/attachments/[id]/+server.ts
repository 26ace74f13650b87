import { error } from '@sveltejs/kit';
import { apiRoute } from '$lib/server/api';
import { db } from '$lib/server/db';
import { requireTeamRole } from '$lib/server/guard';
import { findAttachment } from '$lib/server/repositories/attachments';
import type { RequestHandler } from './$types';

// Snapshots belong to reports, so whoever may view reports may view them. Served with the type
// checked at upload (only PNG is accepted), never sniffed, never inline script.
export const GET: RequestHandler = apiRoute(async ({ locals, params }) => {
	const { team } = await requireTeamRole(locals, params.slug, 'report.view');
	const a = await findAttachment(db, team.id, params.id);
	if (!a) error(404, { message: 'No such attachment in this team.', code: 'not_found' });
	return new Response(new Uint8Array(a.bytes), {
		headers: {
			'content-type': a.content_type,
			'content-length': String(a.byte_size),
			'x-content-type-options': 'nosniff',
			'content-security-policy': "default-src 'none'",
			'content-disposition': `inline; filename="snapshot-${a.id}.png"`
		}
	});
});
