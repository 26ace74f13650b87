import { expect, request as playwrightRequest, type APIRequestContext } from '@playwright/test';
import { readdir, readFile } from 'node:fs/promises';
import { join } from 'node:path';
import { simpleParser } from 'mailparser';
import { baseURL } from '../../../playwright.config';

// Helpers for the account tests. Everything goes through the running app over HTTP, the way a
// browser or the command line would; mail is read from the files the mail fake writes.

export const origin = baseURL;
/** Form posts as a browser makes them: same Origin (SvelteKit's CSRF check) and an HTML answer. */
export const formHeaders = { origin: baseURL, accept: 'text/html' };

let seq = 0;
/** Unique invented addresses per run, so tests never collide with each other or with the seeds. */
export function freshEmail(label: string): string {
	return `${label}-${Date.now().toString(36)}-${++seq}@matrix.example`;
}

export const PASSWORD = 'phase-kickback-31';

export async function newContext(): Promise<APIRequestContext> {
	return playwrightRequest.newContext({ baseURL, maxRedirects: 0 });
}

export async function signUp(ctx: APIRequestContext, email: string, name: string, password = PASSWORD): Promise<void> {
	const res = await ctx.post('/signup', { form: { name, email, password }, headers: formHeaders });
	expect(res.status(), `sign-up of ${email}`).toBe(303);
}

export async function signIn(ctx: APIRequestContext, email: string, password = PASSWORD) {
	return ctx.post('/signin', { form: { email, password }, headers: formHeaders });
}

type CaughtMail = { file: string; to: string; subject: string; text: string; html: string; links: string[] };

async function readAllMail(): Promise<CaughtMail[]> {
	const dir = process.env.MAIL_DIR;
	if (!dir) throw new Error('MAIL_DIR is not set: run through npm test');
	const files = (await readdir(dir).catch(() => [] as string[])).filter((f) => f.endsWith('.eml')).sort();
	const out: CaughtMail[] = [];
	for (const file of files) {
		const m = await simpleParser(await readFile(join(dir, file)));
		const to = Array.isArray(m.to) ? m.to.map((a) => a.text).join(', ') : (m.to?.text ?? '');
		const text = m.text ?? '';
		out.push({ file, to, subject: m.subject ?? '', text, html: typeof m.html === 'string' ? m.html : '', links: text.match(/https?:\/\/[^\s<>"]+/g) ?? [] });
	}
	return out;
}

/** The newest message to `address` whose first link contains `pathPart`, waiting for it to arrive. */
export async function waitForMail(address: string, pathPart: string, timeoutMs = 10_000): Promise<CaughtMail & { link: string }> {
	const until = Date.now() + timeoutMs;
	while (Date.now() < until) {
		const mine = (await readAllMail()).filter((m) => m.to.includes(address) && m.links.some((l) => l.includes(pathPart)));
		const last = mine.at(-1);
		if (last) return { ...last, link: last.links.find((l) => l.includes(pathPart))! };
		await new Promise((r) => setTimeout(r, 150));
	}
	throw new Error(`no mail to ${address} with a link to ${pathPart} within ${timeoutMs} ms`);
}

export async function countMail(address: string): Promise<number> {
	return (await readAllMail()).filter((m) => m.to.includes(address)).length;
}

/** A path (for the app under test) from an absolute link in a mail. */
export function pathOf(link: string): string {
	const u = new URL(link);
	expect(u.origin).toBe(baseURL);
	return u.pathname + u.search;
}

/** Every caught message to `address` (oldest first), for counting mails per event. */
export async function mailTo(address: string): Promise<CaughtMail[]> {
	return (await readAllMail()).filter((m) => m.to.includes(address));
}
