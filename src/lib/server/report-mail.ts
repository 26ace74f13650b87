import { config } from './config';
import { sendMail, type Mail } from './mail';
import { routes } from '$lib/routes';
import { SEVERITY_LABEL, type Severity } from '$lib/debug/reports';

// The e-mail an assignee and a reviewer get when a report names them: what, where, and a link
// straight to the replay at the reported step (the replay links back to the report).

const esc = (s: string) => s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);

export function reportMail(p: {
	to: string;
	name: string;
	part: 'assignee' | 'reviewer';
	authorName: string;
	teamName: string;
	teamSlug: string;
	reportId: string;
	traceId: string;
	step: number;
	title: string;
	circuitTitle: string;
	severity: Severity;
}): Mail {
	const replay = new URL(routes.replay(p.teamSlug, p.traceId, p.step, p.reportId), config.origin).toString();
	const report = new URL(routes.report(p.teamSlug, p.reportId), config.origin).toString();
	const ask = p.part === 'assignee' ? 'assigned it to you' : 'asked you to review it';
	const lines = [
		`Hello ${p.name},`,
		`${p.authorName} opened a report in ${p.teamName} and ${ask}: "${p.title}" (${SEVERITY_LABEL[p.severity].toLowerCase()} severity), on "${p.circuitTitle}" at step ${p.step}.`,
		'The replay recomputes the saved run and opens at that step, with the team’s breakpoint notes beside it.'
	];
	return {
		to: p.to,
		subject: `[${p.teamName}] Report: ${p.title}`,
		text: `${lines.join('\n\n')}\n\nReplay at step ${p.step}:\n${replay}\n\nThe report:\n${report}\n`,
		html: `<!doctype html><html><body style="font-family:system-ui,sans-serif;color:#1d2330;background:#f6f1e7;padding:24px">
<div style="max-width:520px;margin:auto;background:#fffdf8;border:1px solid #d9cfbb;border-radius:10px;padding:24px">
<p style="font-weight:600;margin-top:0">Orrery</p>
${lines.map((l) => `<p>${esc(l)}</p>`).join('\n')}
<p><a href="${esc(replay)}" style="display:inline-block;background:#b8652f;color:#f6f1e7;padding:10px 16px;border-radius:8px;text-decoration:none">Replay at step ${p.step}</a></p>
<p style="font-size:13px;color:#6b7284">Replay: ${esc(replay)}<br>Report: ${esc(report)}</p>
</div></body></html>`
	};
}

/** Send the report mail to whoever the report names; a failed send is logged, not fatal. */
export async function notifyReportPeople(p: Omit<Parameters<typeof reportMail>[0], 'to' | 'name' | 'part'> & { people: { part: 'assignee' | 'reviewer'; email: string; name: string }[] }): Promise<number> {
	let sent = 0;
	const seen = new Set<string>();
	for (const person of p.people) {
		if (seen.has(person.email)) continue;
		seen.add(person.email);
		try {
			await sendMail(reportMail({ ...p, to: person.email, name: person.name, part: person.part }));
			sent++;
		} catch (e) {
			console.error('report mail failed', person.email, e);
		}
	}
	return sent;
}
