import { expect, test, type APIRequestContext } from '@playwright/test';
import { spawn } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { baseURL } from '../../playwright.config';
import { formHeaders, mailTo, newContext, pathOf, signIn, waitForMail } from './support/accounts';
import { demo, hydrated, signInInBrowser } from './support/demo';

// Issue 18: `orrery push` against the built app, as a CI job runs it (a real process, the token
// in ORRERY_TOKEN). The circuit is the 3-bit Fourier adder of Draper 2000 (quant-ph/0008033) as
// a plain gate list (our fixture adder3.qasm); the faulty copy turns cu1(pi/2) a[1], b[2] into
// pi/4, so with a[1] = 1 the run first leaves its expected angles at that gate: step 11 (six QFT
// gates, then the fifth gate of the adder), on b[2]. The team is the seeded demo lab (invented).

const SLUG = 'halvorsen-lab';
const fixture = readFileSync('src/lib/quantum/qasm/fixtures/adder3.qasm', 'utf8');
const faultyText = fixture.replace('cu1(pi/2) a[1], b[2];', 'cu1(pi/4) a[1], b[2];');
const FAULT_STEP = 11;
const dir = mkdtempSync(join(tmpdir(), 'orrery-push-'));
const file = (name: string, text: string) => {
	const p = join(dir, name);
	writeFileSync(p, text);
	return p;
};

type PushResult = { code: number; out: string; err: string; json: Record<string, unknown> | null };
/** Run the command line as CI would: `node bin/orrery.js push …` with ORRERY_TOKEN set. */
function push(token: string, args: string[]): Promise<PushResult> {
	return new Promise((resolve) => {
		const child = spawn(process.execPath, ['bin/orrery.js', 'push', ...args, '--server', baseURL], { env: { ...process.env, ORRERY_TOKEN: token } });
		let out = '';
		let err = '';
		child.stdout.on('data', (d) => (out += d));
		child.stderr.on('data', (d) => (err += d));
		child.on('close', (code) => {
			let json: Record<string, unknown> | null;
			try {
				json = JSON.parse(out);
			} catch {
				json = null;
			}
			resolve({ code: code ?? -1, out, err, json });
		});
	});
}

/** An API token made on the tokens page (the secret is in the action's answer, shown once). */
async function makeToken(ctx: APIRequestContext, role: string): Promise<string> {
	const res = await ctx.post(`/teams/${SLUG}/tokens?/create`, { form: { name: `push-e2e-${Date.now()}`, role }, headers: { origin: formHeaders.origin, accept: 'application/json', 'x-sveltekit-action': 'true' } });
	const body = await res.json();
	expect(body.type).toBe('success');
	return (JSON.parse(body.data) as unknown[]).find((v) => typeof v === 'string' && v.startsWith('orr_')) as string;
}

let engineer: APIRequestContext;
let token = '';
test.describe.configure({ mode: 'serial' });
test.beforeAll(async () => {
	engineer = await newContext();
	expect((await signIn(engineer, demo.engineer.email, demo.engineer.password)).status()).toBe(303);
	token = await makeToken(engineer, 'engineer');
});
test.afterAll(async () => engineer?.dispose());

test('push names its target: --new makes a circuit, --circuit with a stale --base is refused naming both versions, --force adds on top', async () => {
	// Six runs of the command line, each starting tsx (about 6 s of CPU, several times that on a busy machine).
	test.setTimeout(480_000);
	const title = `Pushed adder ${Date.now()}`;
	const fixed = file('adder3.qasm', fixture);
	const first = await push(token, [fixed, '--new', title, '--spec', 'b = a + b mod 8', '--json']);
	expect(first.err).toBe('');
	expect(first.code).toBe(0);
	const circuit = first.json!.circuit as { id: string; version: number; addedVersion: boolean };
	expect(circuit).toMatchObject({ version: 1, addedVersion: true });

	// A second --new with the same title makes another circuit: nothing is matched by title.
	const again = await push(token, [fixed, '--new', title, '--spec', 'b = a + b mod 8', '--json']);
	expect((again.json!.circuit as { id: string }).id).not.toBe(circuit.id);

	// The same file again onto version 1: no new version, the trace refers to version 1.
	const same = await push(token, [fixed, '--circuit', circuit.id, '--base', '1', '--spec', 'b = a + b mod 8', '--json']);
	expect(same.json!.circuit).toMatchObject({ id: circuit.id, version: 1, addedVersion: false });

	// A changed file based on version 1 becomes version 2.
	const v2 = file('adder3-v2.qasm', fixture.replace('// inverse QFT on b', '// inverse QFT on b (v2)\nh a[0];\nh a[0];'));
	const second = await push(token, [v2, '--circuit', circuit.id, '--base', '1', '--spec', 'b = a + b mod 8', '--json']);
	expect(second.json!.circuit).toMatchObject({ version: 2, addedVersion: true });

	// Someone else's file, also based on version 1, is refused: the message names both versions.
	const v2b = file('adder3-other.qasm', fixture.replace('// inverse QFT on b', '// inverse QFT on b (other)\nx a[0];\nx a[0];'));
	const stale = await push(token, [v2b, '--circuit', circuit.id, '--base', '1', '--spec', 'b = a + b mod 8']);
	expect(stale.code).toBe(2);
	expect(stale.err).toMatch(/refused: .* is at version 2, but your file is based on version 1/);
	const versions = await engineer.get(`/api/teams/${SLUG}/circuits/${circuit.id}/export?format=json&version=3`);
	expect(versions.status()).toBe(404); // nothing was added

	const forced = await push(token, [v2b, '--circuit', circuit.id, '--base', '1', '--force', '--spec', 'b = a + b mod 8', '--json']);
	expect(forced.code).toBe(0);
	expect(forced.json!.circuit).toMatchObject({ version: 3, addedVersion: true });

	// A passing push sends no verdict: the upload queued the server's own check of v3, which passes.
	await expect
		.poll(
			async () => {
				const res = await engineer.get(`/api/teams/${SLUG}/circuits?perPage=100`);
				const row = ((await res.json()).circuits as { id: string; latestVersion: number; check: { by: string; version?: number; status: string } }[]).find((c) => c.id === circuit.id);
				return row ? `v${row.latestVersion} check of v${row.check.version} by ${row.check.by}: ${row.check.status}` : 'missing';
			},
			{ timeout: 180_000, intervals: [1000] }
		)
		.toBe('v3 check of v3 by server: pass');
});

test('a failing push: the trace carries the divergence the server recomputed; the report opens there with a server-drawn board and the ledger', async () => {
	test.setTimeout(240_000);
	const r = await push(token, [file('adder3-faulty.qasm', faultyText), '--new', `Faulty pushed adder ${Date.now()}`, '--spec', 'b = a + b mod 8', '--json']);
	expect(r.code).toBe(1);
	const trace = r.json!.trace as { id: string; firstDivergence: { step: number; label: string } };
	expect(trace.firstDivergence).toMatchObject({ step: FAULT_STEP, label: 'b[2]' });
	const saved = await (await engineer.get(`/api/teams/${SLUG}/traces/${trace.id}`)).json();
	expect(saved.trace.computedBy).toBe('server');
	expect(saved.trace.diverged).toBe(true);

	const reportId = (r.json!.report as { id: string }).id;
	const report = (await (await engineer.get(`/api/teams/${SLUG}/reports/${reportId}`)).json()).report;
	expect(report.step).toBe(FAULT_STEP);
	expect(report.links.replay).toContain(`step=${FAULT_STEP}`);
	expect(report.board.ledger.label).toBe('b[2]');
	expect(report.board.ledger.rows.at(-1)).toMatchObject({ step: FAULT_STEP, parted: true, expected: '1/4', total: '1/8' });

	const svg = await engineer.get(report.links.board);
	expect(svg.status()).toBe(200);
	expect(svg.headers()['content-type']).toContain('image/svg+xml');
	const text = await svg.text();
	expect(text).toContain('<g data-qubit="5" data-diverged="true">'); // b[2]: flat qubit 3 + 2
	expect(text).toContain(`step ${FAULT_STEP} of`);
	expect(text).toContain('exact simulation, not a hardware run');
	// Only members see it.
	const stranger = await newContext();
	expect((await stranger.get(report.links.board)).status()).toBe(401);
	await stranger.dispose();
});

/** The newest mail to `address` linking to `pathPart` whose subject has `subject` (older mail to the demo people is skipped). */
async function mailWithSubject(address: string, pathPart: string, subject: string) {
	const until = Date.now() + 15_000;
	for (;;) {
		const m = await waitForMail(address, pathPart).catch(() => null);
		if (m && m.subject.includes(subject)) return m;
		if (Date.now() > until) throw new Error(`no mail to ${address} with subject "${subject}"`);
		await new Promise((r) => setTimeout(r, 200));
	}
}

test('end to end: the engineer pushes a failing file; the reviewer gets the mail, opens the report at the divergence with its picture, comments; the engineer gets the mail', async ({ browser }) => {
	test.setTimeout(300_000);
	const title = `CI: pushed adder fails ${Date.now()}`;
	const r = await push(token, [file('adder3-ci.qasm', faultyText), '--new', `CI adder ${Date.now()}`, '--spec', 'b = a + b mod 8', '--title', title, '--reviewer', demo.reviewer.email]);
	expect(r.code).toBe(1);
	expect(r.out).toContain(`first divergence: step ${FAULT_STEP} on b[2]`);

	// The reviewer's mail links to the replay at the divergence step (and back to the report).
	const mail = await mailWithSubject(demo.reviewer.email, `step=${FAULT_STEP}`, title);
	const reviewerCtx = await browser.newContext();
	const rev = await reviewerCtx.newPage();
	await signInInBrowser(rev, demo.reviewer.email, demo.reviewer.password);
	const reportLink = mail.links.find((l) => /\/reports\/[a-z2-7]{24}$/.test(l))!;
	await rev.goto(pathOf(reportLink));
	await hydrated(rev);
	await expect(rev.getByTestId('report-title')).toHaveText(title);
	await expect(rev.getByText(`step ${FAULT_STEP} of`)).toBeVisible();
	// The picture is the server's drawing of the board at that step, and it really loads.
	const img = rev.getByTestId('report-board-image');
	await expect(img).toBeVisible();
	const size = await img.evaluate(async (el: HTMLImageElement) => (await el.decode(), { w: el.naturalWidth, h: el.naturalHeight }));
	expect(size.w).toBeGreaterThan(300);
	expect(size.h).toBeGreaterThan(100);
	await expect(rev.getByTestId('report-ledger')).toContainText('Ledger of b[2]');
	await expect(rev.getByTestId('report-replay-link')).toHaveAttribute('href', new RegExp(`step=${FAULT_STEP}`));

	// The replay the mail links to opens at that step.
	await rev.goto(pathOf(mail.link));
	await hydrated(rev);
	await expect(rev).toHaveURL(new RegExp(`step=${FAULT_STEP}`));
	await rev.goto(pathOf(reportLink));
	await hydrated(rev);

	const comment = `Confirmed on b[2]: the rotation from a[1] is half of what it should be (${Date.now()}).`;
	await rev.getByLabel('Comment (markdown)').fill(comment);
	await rev.getByRole('button', { name: 'Add comment' }).click();
	await expect(rev.getByTestId('report-comments')).toContainText(comment);

	// The engineer (who opened the report from the command line) gets one mail for the comment.
	const back = await mailWithSubject(demo.engineer.email, `step=${FAULT_STEP}`, `Comment on: ${title}`);
	expect(back.text).toContain(comment);
	// One mail per person per event, and none to the person who acted.
	await new Promise((r) => setTimeout(r, 500));
	expect((await mailTo(demo.engineer.email)).filter((m) => m.subject === `[Halvorsen Phase Lab] Comment on: ${title}`)).toHaveLength(1);
	expect((await mailTo(demo.reviewer.email)).filter((m) => m.subject.includes(`Comment on: ${title}`))).toHaveLength(0);
	await reviewerCtx.close();
});
