import type { Db } from '../db';
import { newId } from '../ids';
import { renderMarkdown } from '../markdown';
import type { z } from 'zod';
import type { breakpointSpecSchema } from '$lib/schemas/review';
import type { SavedBreakpointView } from '$lib/review/types';

type Spec = z.infer<typeof breakpointSpecSchema>;

export type SavedBreakpoint = SavedBreakpointView;

/** Thrown when a note edit is based on an older revision than the stored one. */
export class StaleRevisionError extends Error {
	constructor(readonly latest: number) {
		super(`Someone changed this note since you opened it (now revision ${latest}). Reload to see it, then edit again.`);
	}
}

const json = <T>(v: unknown): T => (typeof v === 'string' ? (JSON.parse(v) as T) : (v as T));

export async function insertBreakpoint(db: Db, p: { teamId: string; circuitId: string; versionId: string; authorId: string; spec: Spec }): Promise<string> {
	const id = newId();
	const { note, ...shape } = p.spec;
	const now = new Date();
	await db('breakpoints').insert({
		id,
		team_id: p.teamId,
		circuit_id: p.circuitId,
		circuit_version_id: p.versionId,
		kind: shape.kind,
		spec: JSON.stringify(shape),
		note_md: note,
		note_html: renderMarkdown(note),
		author_id: p.authorId,
		created_at: now,
		updated_at: now
	});
	await db('audit_log').insert({ actor_id: p.authorId, team_id: p.teamId, action: 'breakpoint.create', subject_type: 'breakpoint', subject_id: id });
	return id;
}

export async function listBreakpoints(db: Db, teamId: string, versionId: string): Promise<SavedBreakpoint[]> {
	const rows = await db('breakpoints as b')
		.leftJoin('users as u', 'u.id', 'b.author_id')
		.where({ 'b.team_id': teamId, 'b.circuit_version_id': versionId })
		.orderBy('b.created_at', 'asc')
		.orderBy('b.id', 'asc')
		.select('b.*', 'u.name as author_name');
	const comments = rows.length
		? await db('breakpoint_comments as c')
				.leftJoin('users as u', 'u.id', 'c.author_id')
				.whereIn('c.breakpoint_id', rows.map((r) => r.id))
				.orderBy('c.created_at', 'asc')
				.orderBy('c.id', 'asc')
				.select('c.*', 'u.name as author_name')
		: [];
	return rows.map((r) => ({
		id: r.id,
		circuitId: r.circuit_id,
		versionId: r.circuit_version_id,
		spec: json(r.spec),
		note: r.note_md,
		noteHtml: r.note_html,
		author: r.author_id ? { id: r.author_id, name: r.author_name ?? '' } : null,
		revision: r.revision,
		createdAt: (r.created_at as Date).toISOString(),
		updatedAt: (r.updated_at as Date).toISOString(),
		comments: comments
			.filter((c) => c.breakpoint_id === r.id)
			.map((c) => ({ id: c.id, author: c.author_id ? { id: c.author_id, name: c.author_name ?? '' } : null, bodyHtml: c.body_html, createdAt: (c.created_at as Date).toISOString() }))
	}));
}

export async function findBreakpoint(db: Db, teamId: string, id: string): Promise<{ id: string; circuit_version_id: string; revision: number } | undefined> {
	return db('breakpoints').where({ team_id: teamId, id }).first('id', 'circuit_version_id', 'revision');
}

/** Replace the note when `revision` is still the stored one; returns the new revision. */
export async function annotateBreakpoint(db: Db, teamId: string, id: string, actorId: string, note: string, revision: number): Promise<number> {
	const n = await db('breakpoints')
		.where({ team_id: teamId, id, revision })
		.update({ note_md: note, note_html: renderMarkdown(note), revision: revision + 1, updated_at: new Date() });
	if (!n) {
		const row = await db('breakpoints').where({ team_id: teamId, id }).first('revision');
		if (row) throw new StaleRevisionError(row.revision);
		return 0;
	}
	await db('audit_log').insert({ actor_id: actorId, team_id: teamId, action: 'breakpoint.annotate', subject_type: 'breakpoint', subject_id: id, detail: JSON.stringify({ revision: revision + 1 }) });
	return revision + 1;
}

export async function addBreakpointComment(db: Db, breakpointId: string, authorId: string, body: string): Promise<string> {
	const id = newId();
	await db('breakpoint_comments').insert({ id, breakpoint_id: breakpointId, author_id: authorId, body_md: body, body_html: renderMarkdown(body), created_at: new Date() });
	return id;
}

export async function deleteBreakpoint(db: Db, teamId: string, id: string, actorId: string): Promise<boolean> {
	const n = await db('breakpoints').where({ team_id: teamId, id }).delete();
	if (n) await db('audit_log').insert({ actor_id: actorId, team_id: teamId, action: 'breakpoint.delete', subject_type: 'breakpoint', subject_id: id });
	return n > 0;
}
