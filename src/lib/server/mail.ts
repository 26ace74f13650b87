import nodemailer, { type Transporter } from 'nodemailer';
import { config } from './config';
import { onShutdown } from './shutdown';
import { routes } from '$lib/routes';
import { ROLE_LABEL, type Role } from '$lib/permissions';

// Every message the app sends goes through here, over SMTP to config.smtpUrl. In development
// and tests that is the local mail fake, which keeps each message as an .eml file.

let transport: Transporter | null = null;
function getTransport(): Transporter {
	transport ??= nodemailer.createTransport(config.smtpUrl);
	return transport;
}

/** Close the SMTP transport (at shutdown); the next send opens a new one. */
export function closeMail(): void {
	transport?.close();
	transport = null;
}
onShutdown('mail transport', closeMail);

export type Mail = { to: string; subject: string; text: string; html: string };

export async function sendMail(mail: Mail): Promise<void> {
	await getTransport().sendMail({ from: config.mailFrom, ...mail });
}

const absolute = (path: string) => new URL(path, config.origin).toString();

function esc(s: string): string {
	return s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);
}

function html(paragraphs: string[], link: { href: string; label: string }, footer: string): string {
	return `<!doctype html><html><body style="font-family:system-ui,sans-serif;color:#1d2330;background:#f6f1e7;padding:24px">
<div style="max-width:520px;margin:auto;background:#fffdf8;border:1px solid #d9cfbb;border-radius:10px;padding:24px">
<p style="font-weight:600;margin-top:0">Orrery</p>
${paragraphs.map((p) => `<p>${esc(p)}</p>`).join('\n')}
<p><a href="${esc(link.href)}" style="display:inline-block;background:#b8652f;color:#f6f1e7;padding:10px 16px;border-radius:8px;text-decoration:none">${esc(link.label)}</a></p>
<p style="font-size:13px;color:#6b7284">Or paste this address into your browser: ${esc(link.href)}</p>
<p style="font-size:13px;color:#6b7284">${esc(footer)}</p>
</div></body></html>`;
}

export function invitationMail(p: { to: string; teamName: string; role: Role; inviterName: string; token: string }): Mail {
	const link = absolute(routes.invite(p.token));
	const lines = [
		`${p.inviterName} would like you to join "${p.teamName}" on Orrery as ${ROLE_LABEL[p.role].toLowerCase()}.`,
		'Orrery is where the team steps, proves and reviews its Fourier-basis arithmetic circuits.'
	];
	const footer = 'The link works once and for seven days. If you did not expect it, you can ignore this message.';
	return {
		to: p.to,
		subject: `Join ${p.teamName} on Orrery`,
		text: `${lines.join('\n\n')}\n\nAccept the invitation:\n${link}\n\n${footer}\n`,
		html: html(lines, { href: link, label: 'Accept the invitation' }, footer)
	};
}

export function passwordResetMail(p: { to: string; name: string; token: string }): Mail {
	const link = absolute(routes.resetPassword(p.token));
	const lines = [`Hello ${p.name},`, 'someone (we hope you) asked to set a new Orrery password for this address.'];
	const footer = 'The link works once, for one hour. Setting a new password signs you out everywhere else. If you did not ask, ignore this message; your password stays as it is.';
	return {
		to: p.to,
		subject: 'Set a new Orrery password',
		text: `${lines.join('\n')}\n\nChoose a new password:\n${link}\n\n${footer}\n`,
		html: html(lines, { href: link, label: 'Choose a new password' }, footer)
	};
}
