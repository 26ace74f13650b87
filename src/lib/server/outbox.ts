import { readdir, readFile } from 'node:fs/promises';
import { join } from 'node:path';
import { simpleParser } from 'mailparser';
import { config } from './config';

export type OutboxMessage = { file: string; to: string; subject: string; date: string | null; text: string; links: string[] };

/** The bare addresses in a To: line ("Ann <a@x>, b@y" → ["a@x", "b@y"]), lower-cased. */
export function addressesOf(to: string): string[] {
	return [...to.toLowerCase().matchAll(/[^\s<>,"]+@[^\s<>,"]+/g)].map((m) => m[0]);
}

/**
 * The newest `limit` messages the mail fake caught for `address` (looking through at most the
 * newest 500 files), parsed. Development and tests only.
 */
export async function readOutbox(address: string, limit = 50): Promise<OutboxMessage[]> {
	const wanted = address.toLowerCase();
	let files: string[];
	try {
		files = (await readdir(config.mailDir)).filter((f) => f.endsWith('.eml'));
	} catch {
		return [];
	}
	files.sort().reverse();
	const out: OutboxMessage[] = [];
	for (const file of files.slice(0, 500)) {
		if (out.length >= limit) break;
		const parsed = await simpleParser(await readFile(join(config.mailDir, file)));
		const to = Array.isArray(parsed.to) ? parsed.to.map((a) => a.text).join(', ') : (parsed.to?.text ?? '');
		if (!addressesOf(to).includes(wanted)) continue;
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
