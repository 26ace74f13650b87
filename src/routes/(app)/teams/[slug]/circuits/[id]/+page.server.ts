import { error, fail, redirect } from '@sveltejs/kit';
import { db } from '$lib/server/db';
import { requireTeamRole } from '$lib/server/guard';
import { can } from '$lib/permissions';
import { createCircuit, findCircuit, findVersion, listVersions, saveVersion, StaleVersionError } from '$lib/server/repositories/circuits';
import { readPostedDocument } from '$lib/server/heavy';
import { routes } from '$lib/routes';
import { loadTeamReview } from '$lib/server/review';
import { enqueueIfSpecified, readProgress } from '$lib/server/checks/enqueue';
import { latestCheckOfVersion } from '$lib/server/checks/store';
import { checkView } from '$lib/server/checks/view';
import type { Actions, PageServerLoad } from './$types';

const NOT_FOUND = { message: 'No such circuit in this team.', code: 'not_found' };
/** Largest document a save may send (bytes of JSON). */
const MAX_DOCUMENT_BYTES = 4 * 1024 * 1024;

export const load: PageServerLoad = async ({ locals, params, url, depends }) => {
	depends('app:circuit');
	const access = await requireTeamRole(locals, params.slug, 'circuit.view', { redirectFrom: url });
	const circuit = await findCircuit(db, access.team.id, params.id);
	if (!circuit) error(404, NOT_FOUND);
	const asked = Number(url.searchParams.get('version') ?? circuit.latest_version);
	const version = await findVersion(db, circuit.id, Number.isInteger(asked) && asked > 0 ? asked : circuit.latest_version);
	if (!version) error(404, { message: `This circuit has no version ${asked}.`, code: 'not_found' });
	const versions = await listVersions(db, circuit.id);
	const check = await latestCheckOfVersion(db, circuit.id, version.version);
	return {
		team: { slug: access.team.slug, name: access.team.name },
		role: access.role,
		canEdit: can(access.role, 'circuit.edit') && version.version === circuit.latest_version,
		circuit: { id: circuit.id, title: circuit.title, latestVersion: circuit.latest_version },
		version: { number: version.version, hash: version.hash, createdAt: version.created_at.toISOString(), message: version.message },
		document: version.document,
		versions: versions.map((v) => ({ number: v.version, message: v.message, createdAt: v.created_at.toISOString() })),
		review: await loadTeamReview(access, version.id),
		serverCheck: check ? checkView(check, await readProgress(db, check).catch(() => null)) : null,
		canRunChecks: can(access.role, 'check.run')
	};
};

/** The posted document, validated and sized in the worker pool (heavy/index.ts). */
async function readDocument(data: FormData) {
	const raw = data.get('document');
	if (typeof raw !== 'string' || raw.length === 0) return { ok: false as const, status: 400, message: 'The save carried no circuit.' };
	return readPostedDocument({ text: raw, maxBytes: MAX_DOCUMENT_BYTES }, 'Checking the saved circuit');
}

export const actions: Actions = {
	save: async ({ locals, params, request }) => {
		const access = await requireTeamRole(locals, params.slug, 'circuit.edit');
		const circuit = await findCircuit(db, access.team.id, params.id);
		if (!circuit) error(404, NOT_FOUND);
		const data = await request.formData();
		const base = Number(data.get('base'));
		const doc = await readDocument(data);
		if (!doc.ok) return fail(doc.status, { saveError: doc.message });
		if (!Number.isInteger(base) || base < 1) return fail(400, { saveError: 'The save did not say which version it was based on.' });
		try {
			const version = await saveVersion(db, circuit.id, base, access.user.id, doc.document, String(data.get('message') ?? '').slice(0, 255), doc.gateCount);
			const check = await enqueueIfSpecified(db, doc.document, { teamId: access.team.id, circuitId: circuit.id, version, userId: access.user.id, reason: 'save' });
			return { saved: version, checkId: check?.id ?? null };
		} catch (e) {
			if (e instanceof StaleVersionError)
				return fail(409, {
					conflict: { base: e.base, latest: e.latest },
					saveError: `Someone saved version ${e.latest} while you were editing version ${e.base}. Your changes are still here: open version ${e.latest} in another tab to compare, or save yours as a copy.`
				});
			throw e;
		}
	},

	saveCopy: async ({ locals, params, request }) => {
		const access = await requireTeamRole(locals, params.slug, 'circuit.edit');
		const data = await request.formData();
		const doc = await readDocument(data);
		if (!doc.ok) return fail(doc.status, { saveError: doc.message });
		const copy = { ...doc.document, title: `${doc.document.title} (my copy)`.slice(0, 120) };
		const { circuit } = await createCircuit(db, access.team.id, access.user.id, copy, `copy of ${params.id}`, doc.gateCount);
		await enqueueIfSpecified(db, copy, { teamId: access.team.id, circuitId: circuit.id, version: 1, userId: access.user.id, reason: 'save' });
		redirect(303, routes.circuit(access.team.slug, circuit.id));
	}
};
