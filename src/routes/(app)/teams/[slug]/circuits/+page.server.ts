import { error, fail, redirect } from '@sveltejs/kit';
import { db } from '$lib/server/db';
import { requireTeamRole } from '$lib/server/guard';
import { parseForm, formFailure } from '$lib/server/forms';
import { can } from '$lib/permissions';
import { createCircuit, deleteCircuit, findCircuit, findVersion, listCircuits } from '$lib/server/repositories/circuits';
import { countGates, importUpload } from '$lib/server/heavy';
import { circuitIdSchema, newCircuitSchema } from '$lib/schemas/circuits';
import { makeTemplate } from '$lib/quantum/templates';
import { routes } from '$lib/routes';
import { enqueueIfSpecified } from '$lib/server/checks/enqueue';
import { circuitCheckView } from '$lib/server/checks/view';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async ({ locals, params, url, depends }) => {
	depends('app:circuits');
	const access = await requireTeamRole(locals, params.slug, 'circuit.view', { redirectFrom: url });
	const rows = await listCircuits(db, access.team.id);
	return {
		team: { slug: access.team.slug, name: access.team.name },
		role: access.role,
		canEdit: can(access.role, 'circuit.edit'),
		circuits: rows.map((r) => ({
			id: r.id,
			title: r.title,
			registers: r.register_summary,
			gateCount: r.gate_count,
			version: r.latest_version,
			author: r.author_name ?? '—',
			check: circuitCheckView(r.check),
			updatedAt: r.updated_at.toISOString()
		}))
	};
};

export const actions: Actions = {
	create: async ({ locals, params, request }) => {
		const access = await requireTeamRole(locals, params.slug, 'circuit.edit');
		const form = await parseForm(request, newCircuitSchema);
		if (!form.ok) return form.failure;
		const doc = makeTemplate(form.data.template, form.data.title, form.data.bits);
		const { circuit } = await createCircuit(db, access.team.id, access.user.id, doc, `created from template ${form.data.template}`, await countGates(doc));
		await enqueueIfSpecified(db, doc, { teamId: access.team.id, circuitId: circuit.id, version: 1, userId: access.user.id, reason: 'create' });
		redirect(303, routes.circuit(access.team.slug, circuit.id));
	},

	upload: async ({ locals, params, request }) => {
		const access = await requireTeamRole(locals, params.slug, 'circuit.edit');
		const data = await request.formData();
		const file = data.get('file');
		if (!(file instanceof File) || file.size === 0) return formFailure(400, 'Choose a file to upload.', {}, 'file');
		// Read in the worker pool: past its time or memory limit the form says so (413/422), the server goes on.
		const result = await importUpload(file);
		if (!result.ok) return fail(result.status, { errors: { file: result.errors }, values: {} });
		const { circuit } = await createCircuit(db, access.team.id, access.user.id, result.document, `imported from ${file.name}`, result.gateCount);
		await enqueueIfSpecified(db, result.document, { teamId: access.team.id, circuitId: circuit.id, version: 1, userId: access.user.id, reason: 'upload' });
		redirect(303, routes.circuit(access.team.slug, circuit.id));
	},

	duplicate: async ({ locals, params, request }) => {
		const access = await requireTeamRole(locals, params.slug, 'circuit.edit');
		const form = await parseForm(request, circuitIdSchema);
		if (!form.ok) return form.failure;
		const source = await findCircuit(db, access.team.id, form.data.id);
		if (!source) error(404, { message: 'No such circuit in this team.', code: 'not_found' });
		const version = await findVersion(db, source.id, source.latest_version);
		if (!version) error(404, { message: 'That circuit has no saved version.', code: 'not_found' });
		const doc = { ...version.document, title: `${version.document.title} (copy)`.slice(0, 120) };
		const copy = await createCircuit(db, access.team.id, access.user.id, doc, `duplicated from ${source.title} v${source.latest_version}`, await countGates(doc));
		await enqueueIfSpecified(db, doc, { teamId: access.team.id, circuitId: copy.circuit.id, version: 1, userId: access.user.id, reason: 'create' });
		return { duplicated: true };
	},

	delete: async ({ locals, params, request }) => {
		const access = await requireTeamRole(locals, params.slug, 'circuit.edit');
		const form = await parseForm(request, circuitIdSchema);
		if (!form.ok) return form.failure;
		const gone = await deleteCircuit(db, access.team.id, form.data.id, access.user.id);
		if (!gone) error(404, { message: 'No such circuit in this team.', code: 'not_found' });
		return { deleted: true };
	}
};
