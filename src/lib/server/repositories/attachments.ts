import type { Db } from '../db';
import { newId, sha256 } from '../ids';

export type AttachmentRow = { id: string; team_id: string; content_type: string; byte_size: number; width: number | null; height: number | null; sha256: string; bytes: Buffer; created_at: Date };

export async function insertAttachment(db: Db, p: { teamId: string; userId: string; contentType: string; bytes: Uint8Array; width: number; height: number }): Promise<string> {
	const id = newId();
	const buf = Buffer.from(p.bytes.buffer, p.bytes.byteOffset, p.bytes.byteLength);
	await db('attachments').insert({
		id,
		team_id: p.teamId,
		content_type: p.contentType,
		byte_size: buf.length,
		width: p.width,
		height: p.height,
		sha256: sha256(buf.toString('binary')),
		bytes: buf,
		created_by: p.userId,
		created_at: new Date()
	});
	return id;
}

/**
 * Delete the snapshots of the reports `reports` selects (call inside the transaction that deletes
 * those reports, before the delete: the reports' rows name their snapshots).
 */
export async function deleteReportSnapshots(trx: Db, teamId: string, where: { id?: string; trace_id?: string; circuit_id?: string }): Promise<number> {
	const ids = (await trx('reports').where({ team_id: teamId, ...where }).whereNotNull('snapshot_id').forUpdate().pluck('snapshot_id')) as string[];
	if (ids.length === 0) return 0;
	return trx('attachments').where({ team_id: teamId }).whereIn('id', ids).delete();
}

export async function findAttachment(db: Db, teamId: string, id: string): Promise<AttachmentRow | undefined> {
	return db<AttachmentRow>('attachments').where({ team_id: teamId, id }).first();
}
