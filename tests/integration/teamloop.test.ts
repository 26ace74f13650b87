import { readdir, readFile } from 'node:fs/promises';
import { join } from 'node:path';
import { simpleParser } from 'mailparser';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { haveTestDb, openTestDb } from './test-db';
import { insertUser, deleteUser, LastOwnerError, endOtherSessions, listSessions, teamsOnlyOwnedBy, setReportMail } from '../../src/lib/server/repositories/users';
import { addMember, createTeam, changeMemberRole } from '../../src/lib/server/repositories/teams';
import { acceptInvitation, createInvitation, findPendingInvitation, listPendingInvitations, lookupInvitation, renewInvitation } from '../../src/lib/server/repositories/invitations';
import { createCircuit } from '../../src/lib/server/repositories/circuits';
import { insertTrace } from '../../src/lib/server/repositories/traces';
import { createReport, findReport, reportPeople } from '../../src/lib/server/repositories/reports';
import { computeTraceSummary } from '../../src/lib/server/trace-compute';
import { notifyReportEvent, recipientsFor } from '../../src/lib/server/report-mail';
import { plantedFaultAdder } from '../../src/lib/quantum/templates';

// Issue 18 against the real throwaway MariaDB and the mail fake that npm test starts: invitation
// states (one pending row, superseded, already a member), report mail recipients and the mail
// itself as the fake caught it, sessions, and deleting an account. The HTTP side (actions, roles)
// is in tests/e2e/account.spec.ts, access-matrix.spec.ts and push.spec.ts.

let n = 0;
const addr = (label: string) => `${label}-${Date.now().toString(36)}-${++n}@integration.example`;

async function caughtMail(to: string): Promise<{ subject: string; text: string }[]> {
	const dir = process.env.MAIL_DIR!;
	const out: { subject: string; text: string; to: string }[] = [];
	for (const f of (await readdir(dir).catch(() => [] as string[])).filter((x) => x.endsWith('.eml')).sort()) {
		const m = await simpleParser(await readFile(join(dir, f)));
		const t = Array.isArray(m.to) ? m.to.map((a) => a.text).join(', ') : (m.to?.text ?? '');
		out.push({ subject: m.subject ?? '', text: m.text ?? '', to: t });
	}
	return out.filter((m) => m.to.includes(to));
}

describe.skipIf(!haveTestDb)('team loop: invitations, report mail, sessions, account deletion', () => {
	const db = haveTestDb ? openTestDb() : (null as never);
	const user = (label: string) => insertUser(db, { email: addr(label), name: label, passwordHash: 'not-a-real-hash' });
	beforeAll(() => db.migrate.latest());
	afterAll(() => db?.destroy());

	it('renewing a pending invitation supersedes it: still one pending row, the old link says it was replaced', async () => {
		const owner = await user('inv-owner');
		const team = await createTeam(db, `Renew ${Date.now()}`, owner.id);
		const email = addr('invitee');
		const first = await createInvitation(db, { teamId: team.id, email, role: 'viewer', invitedBy: owner.id });
		expect((await findPendingInvitation(db, team.id, email.toUpperCase()))?.id).toBe(first.invitation.id);
		const renewed = (await renewInvitation(db, team.id, first.invitation.id, owner.id))!;
		expect(renewed.token).not.toBe(first.token);
		expect((await listPendingInvitations(db, team.id)).map((i) => i.id)).toEqual([renewed.invitation.id]);
		expect((await lookupInvitation(db, first.token)).state).toBe('superseded');
		expect((await lookupInvitation(db, renewed.token)).state).toBe('ok');
		// A superseded invitation can be neither renewed nor accepted.
		expect(await renewInvitation(db, team.id, first.invitation.id, owner.id)).toBeNull();
		const invitee = await insertUser(db, { email, name: 'x', passwordHash: 'h' });
		await expect(acceptInvitation(db, first.token, invitee)).rejects.toMatchObject({ status: 410 });
		await acceptInvitation(db, renewed.token, invitee);
		expect((await lookupInvitation(db, renewed.token)).state).toBe('used');
	});

	it('a spare pending link (made before duplicates were refused) for someone already in the team says so', async () => {
		const owner = await user('spare-owner');
		const team = await createTeam(db, `Spare ${Date.now()}`, owner.id);
		const invitee = await user('spare');
		const a = await createInvitation(db, { teamId: team.id, email: invitee.email, role: 'viewer', invitedBy: owner.id });
		const b = await createInvitation(db, { teamId: team.id, email: invitee.email, role: 'viewer', invitedBy: owner.id });
		await acceptInvitation(db, a.token, invitee);
		expect((await lookupInvitation(db, b.token)).state).toBe('member');
		await expect(acceptInvitation(db, b.token, invitee)).rejects.toMatchObject({ status: 410 });
	});

	async function reportFixture() {
		const [author, assignee, reviewer, outsider] = [await user('author'), await user('assignee'), await user('reviewer'), await user('outsider')];
		const team = await createTeam(db, `Mail ${Date.now()}`, author.id);
		await addMember(db, team.id, assignee.id, 'engineer');
		await addMember(db, team.id, reviewer.id, 'reviewer');
		const doc = plantedFaultAdder();
		const { circuit } = await createCircuit(db, team.id, author.id, doc);
		const version = await db('circuit_versions').where({ circuit_id: circuit.id, version: 1 }).first('id');
		const inputs = { values: { c: '1', a: '2', b: '0' }, superposed: [] };
		const summary = computeTraceSummary(doc, inputs);
		const traceId = await insertTrace(db, { teamId: team.id, circuitId: circuit.id, versionId: version.id, version: 1, authorId: author.id, label: 't', inputs, summary, computedBy: 'server' });
		const id = await createReport(db, {
			teamId: team.id,
			authorId: author.id,
			input: { traceId, step: summary.firstDivergence!.step, title: `Half rotation ${n}`, description: '', severity: 'high', assigneeId: assignee.id, reviewerId: reviewer.id },
			snapshot: null
		});
		return { team, author, assignee, reviewer, outsider, report: (await findReport(db, team.id, id))! };
	}

	it('a comment mails the reporter and the assignee, not the reviewer who wrote it; once each, with a link to the step', async () => {
		const f = await reportFixture();
		const people = await reportPeople(db, f.team.id, f.report.id);
		expect(people.map((p) => p.part)).toEqual(['author', 'assignee', 'reviewer']);
		const ctx = { teamId: f.team.id, team: f.team, actor: { id: f.reviewer.id, name: f.reviewer.name }, report: f.report };
		expect(await notifyReportEvent(db, ctx, { kind: 'comment', body: 'Confirmed: b[3] gets 1/16 turn, not 1/8.' })).toBe(2);
		for (const p of [f.author, f.assignee]) {
			const got = await caughtMail(p.email);
			expect(got).toHaveLength(1);
			expect(got[0].subject).toBe(`[${f.team.name}] Comment on: ${f.report.title}`);
			expect(got[0].text).toContain('> Confirmed: b[3] gets 1/16 turn, not 1/8.');
			expect(got[0].text).toContain(`/replay?step=${f.report.step}&report=${f.report.id}`);
		}
		expect(await caughtMail(f.reviewer.email)).toHaveLength(0);
	});

	it('a status change mails everyone but the actor; someone who turned report mail off gets nothing', async () => {
		const f = await reportFixture();
		await setReportMail(db, f.assignee.id, false);
		const ctx = { teamId: f.team.id, team: f.team, actor: { id: f.reviewer.id, name: f.reviewer.name }, report: f.report };
		expect(await notifyReportEvent(db, ctx, { kind: 'status', from: 'open', to: 'confirmed' })).toBe(1);
		const got = await caughtMail(f.author.email);
		expect(got.map((m) => m.subject)).toEqual([`[${f.team.name}] Confirmed: ${f.report.title}`]);
		expect(got[0].text).toContain('from Open to Confirmed');
		expect(await caughtMail(f.assignee.email)).toHaveLength(0);
	});

	it('recipients: the actor never, a person in two parts once, former members never', async () => {
		const f = await reportFixture();
		const people = [
			{ id: 'a', email: 'a@x', name: 'A', mailReportEvents: true, part: 'author' as const },
			{ id: 'a', email: 'a@x', name: 'A', mailReportEvents: true, part: 'assignee' as const },
			{ id: 'r', email: 'r@x', name: 'R', mailReportEvents: true, part: 'reviewer' as const }
		];
		expect(recipientsFor(people, 'r', { kind: 'comment', body: 'x' }).map((p) => p.id)).toEqual(['a']);
		expect(recipientsFor(people, 'a', { kind: 'comment', body: 'x' }).map((p) => p.id)).toEqual(['r']);
		expect(recipientsFor(people, 'x', { kind: 'opened' }).map((p) => p.part)).toEqual(['assignee', 'reviewer']);
		await db('memberships').where({ team_id: f.team.id, user_id: f.assignee.id }).delete();
		expect((await reportPeople(db, f.team.id, f.report.id)).map((p) => p.part)).toEqual(['author', 'reviewer']);
	});

	it('sessions: the list marks the current one; ending the others keeps it', async () => {
		const u = await user('sessions');
		const future = new Date(Date.now() + 86_400_000);
		for (const id of ['s-current-' + n, 's-other1-' + n, 's-other2-' + n]) await db('sessions').insert({ id, user_id: u.id, expires_at: future, created_at: new Date() });
		const list = await listSessions(db, u.id, 's-current-' + n);
		expect(list.filter((s) => s.current)).toHaveLength(1);
		expect(JSON.stringify(list)).not.toContain('s-other1'); // ids are secrets and stay on the server
		expect(await endOtherSessions(db, u.id, 's-current-' + n)).toBe(2);
		expect((await db('sessions').where({ user_id: u.id })).map((s: { id: string }) => s.id)).toEqual(['s-current-' + n]);
	});

	it('deleting an account: refused while the only owner of a team; then allowed, and what they made stays without them', async () => {
		const f = await reportFixture();
		await expect(deleteUser(db, f.author.id)).rejects.toBeInstanceOf(LastOwnerError);
		expect((await teamsOnlyOwnedBy(db, f.author.id)).map((t) => t.slug)).toEqual([f.team.slug]);
		await changeMemberRole(db, f.team.id, f.assignee.id, 'owner');
		expect(await teamsOnlyOwnedBy(db, f.author.id)).toEqual([]);
		await deleteUser(db, f.author.id);
		expect(await db('users').where({ id: f.author.id }).first()).toBeUndefined();
		const r = (await findReport(db, f.team.id, f.report.id))!;
		expect(r.author).toBeNull();
		expect(r.assignee?.id).toBe(f.assignee.id);
	});
});
