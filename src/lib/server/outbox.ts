import { readdir, readFile } from 'node:fs/promises';
import { join } from 'node:path';
import { simpleParser } from 'mailparser';
import { config } from './config';

export type OutboxMessage = { file: string; to: string; subject: string; date: string | null; text: string; links: string[] };

/** The newest `limit` messages the mail fake caught, parsed. Development only. */
export async function readOutbox(limit = 50): Promise<OutboxMessage[]> {
	let files: string[];
	try {
		files = (await readdir(config.mailDir)).filter((f) => f.endsWith('.eml'));
	} catch {
		return [];
	}
	files.sort().reverse();
	const out: OutboxMessage[] = [];
	for (const file of files.slice(0, limit)) {
		const parsed = await simpleParser(await readFile(join(config.mailDir, file)));
		const to = Array.isArray(parsed.to) ? parsed.to.map((a) => a.text).join(', ') : (parsed.to?.text ?? '');
		const text = parsed.text ?? '';
		out.push({
			file,
			to,
			subject: parsed.subject ?? '(no subject)',
			date: parsed.date ? parsed.date.toISOString() : null,
			text,
			links: [...new Set(text.match(/https?:\/\/[^\s<>"]+/g) ?? [])]
		});
	}
	return out;
}
