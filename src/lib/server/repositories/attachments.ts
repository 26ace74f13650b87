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

export async function findAttachment(db: Db, teamId: string, id: string): Promise<AttachmentRow | undefined> {
	return db<AttachmentRow>('attachments').where({ team_id: teamId, id }).first();
}
