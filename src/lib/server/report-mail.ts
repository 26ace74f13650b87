import { config } from './config';
import { sendMail, type Mail } from './mail';
import type { Db } from './db';
import { reportPeople, type ReportPerson, type ReportView } from './repositories/reports';
import { routes } from '$lib/routes';
import { SEVERITY_LABEL, STATUS_LABEL, type ReportStatus } from '$lib/review/reports';

// Mail for the review loop. A report's people (its reporter, assignee and reviewer) hear about
// what others do to it: a new report naming them, each comment, each status change, being named
// assignee or reviewer. One mail per person per event, never to the person who acted, never to
// someone who turned report mail off on the account page. Every mail links to the replay at the
// report's step (which links back to the report) and to the report itself.

const esc = (s: string) => s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);
const abs = (path: string) => new URL(path, config.origin).toString();

export type ReportEvent =
	| { kind: 'opened' }
	| { kind: 'comment'; body: string }
	| { kind: 'status'; from: ReportStatus; to: ReportStatus }
	| { kind: 'named'; as: 'assignee' | 'reviewer' };

type MailContext = {
	team: { name: string; slug: string };
	actor: { id: string; name: string };
	report: Pick<ReportView, 'id' | 'title' | 'step' | 'severity' | 'circuit' | 'trace'>;
};

const PART_WORD: Record<ReportPerson['part'], string> = { author: 'you opened it', assignee: 'it is assigned to you', reviewer: 'you review it' };

/** The mail one person gets for one event on a report. */
export function reportEventMail(ctx: MailContext, event: ReportEvent, to: { email: string; name: string; part: ReportPerson['part'] }): Mail {
	const r = ctx.report;
	const replay = abs(routes.replay(ctx.team.slug, r.trace.id, r.step, r.id));
	const page = abs(routes.report(ctx.team.slug, r.id));
	const where = `"${r.title}" on "${r.circuit.title}" at step ${r.step}`;
	let subject: string;
	let lead: string;
	let quote: string | null = null;
	switch (event.kind) {
		case 'opened':
			subject = `[${ctx.team.name}] Report: ${r.title}`;
			lead = `${ctx.actor.name} opened a report in ${ctx.team.name} and ${to.part === 'reviewer' ? 'asked you to review it' : 'assigned it to you'}: ${where} (${SEVERITY_LABEL[r.severity].toLowerCase()} severity).`;
			break;
		case 'comment':
			subject = `[${ctx.team.name}] Comment on: ${r.title}`;
			lead = `${ctx.actor.name} commented on ${where}:`;
			quote = event.body.length > 1200 ? `${event.body.slice(0, 1200)}…` : event.body;
			break;
		case 'status':
			subject = `[${ctx.team.name}] ${STATUS_LABEL[event.to]}: ${r.title}`;
			lead = `${ctx.actor.name} moved ${where} from ${STATUS_LABEL[event.from]} to ${STATUS_LABEL[event.to]}.`;
			break;
		case 'named':
			subject = `[${ctx.team.name}] You ${event.as === 'reviewer' ? 'review' : 'are assigned'}: ${r.title}`;
			lead = `${ctx.actor.name} ${event.as === 'reviewer' ? 'asked you to review' : 'assigned you'} ${where}.`;
			break;
	}
	const why = `You get this because ${PART_WORD[to.part]}. Turn report mail off on your account page: ${abs(routes.account())}`;
	const text = [`Hello ${to.name},`, lead, ...(quote ? [quote.replace(/^/gm, '> ')] : []), `Replay at step ${r.step}:\n${replay}`, `The report:\n${page}`, why].join('\n\n') + '\n';
	const html = `<!doctype html><html><body style="font-family:system-ui,sans-serif;color:#1d2330;background:#f6f1e7;padding:24px">
<div style="max-width:520px;margin:auto;background:#fffdf8;border:1px solid #d9cfbb;border-radius:10px;padding:24px">
<p style="font-weight:600;margin-top:0">Orrery</p>
<p>${esc(`Hello ${to.name},`)}</p>
<p>${esc(lead)}</p>
${quote ? `<blockquote style="border-left:3px solid #d9cfbb;margin:0;padding:4px 12px;white-space:pre-wrap">${esc(quote)}</blockquote>` : ''}
<p><a href="${esc(replay)}" style="display:inline-block;background:#b8652f;color:#f6f1e7;padding:10px 16px;border-radius:8px;text-decoration:none">Replay at step ${r.step}</a></p>
<p style="font-size:13px;color:#6b7284">Replay: ${esc(replay)}<br>Report: ${esc(page)}</p>
<p style="font-size:13px;color:#6b7284">${esc(why)}</p>
</div></body></html>`;
	return { to: to.email, subject, text, html };
}

/** Who hears about `event`: the report's people minus the actor and anyone who turned report mail off; once each. */
export function recipientsFor(people: ReportPerson[], actorId: string, event: ReportEvent): ReportPerson[] {
	const wanted = people.filter((p) => {
		if (p.id === actorId || !p.mailReportEvents) return false;
		if (event.kind === 'opened') return p.part === 'assignee' || p.part === 'reviewer';
		if (event.kind === 'named') return p.part === event.as;
		return true;
	});
	const seen = new Set<string>();
	return wanted.filter((p) => (seen.has(p.id) ? false : (seen.add(p.id), true)));
}

/** Mail the report's people about `event`; a failed send is logged and does not undo the change. Returns the number sent. */
export async function notifyReportEvent(db: Db, ctx: MailContext & { teamId: string }, event: ReportEvent): Promise<number> {
	const people = recipientsFor(await reportPeople(db, ctx.teamId, ctx.report.id), ctx.actor.id, event);
	let sent = 0;
	for (const p of people) {
		try {
			await sendMail(reportEventMail(ctx, event, p));
			sent++;
		} catch (e) {
			console.error('report mail failed', p.email, e);
		}
	}
	return sent;
}

/** A new report: its assignee and reviewer hear about it. */
export function notifyReportOpened(db: Db, p: { team: { id: string; name: string; slug: string }; actor: { id: string; name: string }; report: ReportView }): Promise<number> {
	return notifyReportEvent(db, { teamId: p.team.id, team: p.team, actor: p.actor, report: p.report }, { kind: 'opened' });
}

/** After an update: one event per status move and per newly named person. */
export function eventsOfChange(before: Pick<ReportView, 'status' | 'assignee' | 'reviewer'>, after: Pick<ReportView, 'status' | 'assignee' | 'reviewer'>): ReportEvent[] {
	const events: ReportEvent[] = [];
	if (before.status !== after.status) events.push({ kind: 'status', from: before.status, to: after.status });
	if (after.assignee && after.assignee.id !== before.assignee?.id) events.push({ kind: 'named', as: 'assignee' });
	if (after.reviewer && after.reviewer.id !== before.reviewer?.id) events.push({ kind: 'named', as: 'reviewer' });
	return events;
}
