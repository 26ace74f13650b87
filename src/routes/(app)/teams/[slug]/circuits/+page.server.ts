import { error, fail, redirect } from '@sveltejs/kit';
import { db } from '$lib/server/db';
import { requireTeamRole } from '$lib/server/guard';
import { parseForm, formFailure } from '$lib/server/forms';
import { can } from '$lib/permissions';
import { createCircuit, deleteCircuit, findCircuit, findVersion, listCircuits } from '$lib/server/repositories/circuits';
import { countGates, importUpload } from '$lib/server/heavy';
import { circuitIdSchema, newCircuitSchema, uploadRegisterMapSchema } from '$lib/schemas/circuits';
import { applyRegisterMap, RegisterMapError } from '$lib/quantum/qasm/register-map';
import { rolesFromSpecs } from '$lib/quantum/roles';
import { makeTemplate } from '$lib/quantum/templates';
import { routes } from '$lib/routes';
import { enqueueIfSpecified } from '$lib/server/checks/enqueue';
import { circuitCheckView } from '$lib/server/checks/view';
import type { Actions, PageServerLoad } from './$types';

/** Schema issues of the register map as form errors under each field (`register-K`, or `register` for the list). */
function registerFieldErrors(issues: { path: PropertyKey[]; message: string }[]): Record<string, string[]> {
	const errors: Record<string, string[]> = {};
	for (const i of issues) (errors[typeof i.path[0] === 'number' ? `register-${i.path[0]}` : 'register'] ??= []).push(i.message);
	return errors;
}

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
		// The register map step: `register` fields as the command line's --register (register-map.ts).
		const fields = data.getAll('register').map((v) => (typeof v === 'string' ? v : ''));
		const map = uploadRegisterMapSchema.safeParse(fields);
		if (!map.success) return fail(400, { errors: registerFieldErrors(map.error.issues), values: {} });
		// Read in the worker pool: past its time or memory limit the form says so (413/422), the server goes on.
		const result = await importUpload(file);
		if (!result.ok) return fail(result.status, { errors: { file: result.errors }, values: {} });
		let document = result.document;
		if (map.data.length) {
			// Relabels qubits only (one pass over a document the pool has already bounded in size).
			try {
				document = applyRegisterMap(document, map.data.map((m) => m.entry)).document;
			} catch (e) {
				if (!(e instanceof RegisterMapError)) throw e;
				const field = e.entry >= 0 ? `register-${map.data[e.entry].field}` : 'register';
				return fail(400, { errors: { [field]: [e.message] }, values: {} });
			}
		}
		// A document that carries specs gives its registers their roles from them (imports say "work").
		if (document.specs?.length) document = { ...document, registers: rolesFromSpecs(document.registers, document.specs).registers };
		const message = `imported from ${file.name}${map.data.length ? ` with registers ${map.data.map((m) => `${m.entry.name}=${m.entry.qubits}`).join(', ')}` : ''}`;
		const { circuit } = await createCircuit(db, access.team.id, access.user.id, document, message, result.gateCount);
		await enqueueIfSpecified(db, document, { teamId: access.team.id, circuitId: circuit.id, version: 1, userId: access.user.id, reason: 'upload' });
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
