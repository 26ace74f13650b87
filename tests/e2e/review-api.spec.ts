import { baseURL } from '../../playwright.config';
import { expect, test } from '@playwright/test';
import { FAULT_INPUTS, faultyAdder, makeCrew, pushTrace, TINY_PNG, type Crew } from './support/review';
import { demo, signInInBrowser } from './support/demo';
import { formHeaders } from './support/accounts';
import { execFile } from 'node:child_process';
import { mkdtemp, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

// Snapshots checked by their bytes, report status rules and stale edits, server-computed
// summaries, and a replay that does not reproduce its saved checksums.

let crew: Crew;
let trace: Awaited<ReturnType<typeof pushTrace>>;

test.describe.configure({ mode: 'serial' });
test.beforeAll(async () => {
	test.setTimeout(120_000);
	crew = await makeCrew('Review api');
	trace = await pushTrace(crew.ctx.engineer, crew.slug, `Api adder ${Date.now()}`);
});
test.afterAll(async () => crew?.dispose());

const reportCount = async () => (await (await crew.ctx.owner.get(`/api/teams/${crew.slug}/reports`)).json()).total as number;
const upload = (buffer: Buffer, name = 'snap.png', mimeType = 'image/png') =>
	crew.ctx.engineer.post(`/api/teams/${crew.slug}/reports`, { headers: { origin: baseURL }, multipart: { report: JSON.stringify({ traceId: trace.id, step: 13, title: 'snapshot test' }), snapshot: { name, mimeType, buffer } } });

test('the server runs a pushed circuit itself and finds the planted fault at the rotation c·a[1] → b[3]', async () => {
	expect(trace.computedBy).toBe('server');
	const got = (await (await crew.ctx.viewer.get(`/api/teams/${crew.slug}/traces/${trace.id}`)).json()).trace;
	// Expected values: gate 12 (0-based) is the faulty rotation, so the divergence shows at step 13
	// on b[3], which should hold 2/16 turn (a=2 adds 2·2^1/2^4) but holds 1/16 (invented demo fault).
	expect(got.firstDivergence).toEqual({ step: 13, qubit: 8, label: 'b[3]' });
	expect(got.diverged).toBe(true);
	expect(got.inputs).toEqual(FAULT_INPUTS);
	expect(got.keyframeChecksums[0]).toEqual({ step: 0, checksum: expect.stringMatching(/^[0-9a-f]{8}$/) });
	expect(got.summary.registerValues).toMatchObject({ c: '1', a: '2' });
});

test('a snapshot that is not a PNG is refused with a clear message, and no report is made', async () => {
	const before = await reportCount();
	const jpeg = Buffer.alloc(2048, 0);
	jpeg.set([0xff, 0xd8, 0xff, 0xe0]);
	const res = await upload(jpeg, 'snap.png', 'image/png'); // claims PNG; the bytes say otherwise
	expect(res.status()).toBe(415);
	expect((await res.json()).error.message).toBe('The snapshot is not a PNG image (its first bytes are not the PNG signature). Send the PNG the workbench captured.');
	const svg = await upload(Buffer.from('<svg xmlns="http://www.w3.org/2000/svg"><script>alert(1)</script></svg>'), 'x.svg', 'image/svg+xml');
	expect(svg.status()).toBe(415);
	expect(await reportCount()).toBe(before);
});

test('an oversized snapshot is refused with its size and the limit, and no report is made', async () => {
	const before = await reportCount();
	const big = Buffer.alloc(6 * 1024 * 1024, 0);
	TINY_PNG.copy(big, 0, 0, 33);
	const res = await upload(big);
	expect(res.status()).toBe(413);
	expect((await res.json()).error.message).toBe('The snapshot is 6.0 MiB; at most 5.0 MiB is accepted. Capture a smaller area or zoom out.');
	expect(await reportCount()).toBe(before);
});

test('an accepted snapshot comes back byte for byte as image/png, with nosniff', async () => {
	const res = await upload(TINY_PNG);
	expect(res.status()).toBe(201);
	const report = (await (await crew.ctx.reviewer.get(`/api/teams/${crew.slug}/reports/${(await res.json()).id}`)).json()).report;
	expect(report.snapshot).toMatchObject({ width: 1, height: 1, byteSize: TINY_PNG.length });
	const img = await crew.ctx.viewer.get(report.links.snapshot);
	expect(img.status()).toBe(200);
	expect(img.headers()['content-type']).toBe('image/png');
	expect(img.headers()['x-content-type-options']).toBe('nosniff');
	expect(Buffer.from(await img.body()).equals(TINY_PNG)).toBe(true);
});

test('status moves follow open → confirmed → fixed → verified, each kept in the history; stale edits get 409', async () => {
	const made = await crew.ctx.engineer.post(`/api/teams/${crew.slug}/reports`, { data: { traceId: trace.id, step: 13, title: 'Rotation exponent off by one', description: 'The angle is **pi/8**; it should be pi/4.\n\n<script>alert(1)</script>' } });
	expect(made.status()).toBe(201);
	const id = (await made.json()).id;
	const patch = (data: object, who = crew.ctx.reviewer) => who.patch(`/api/teams/${crew.slug}/reports/${id}`, { data });

	const skip = await patch({ status: 'verified', revision: 1 });
	expect(skip.status()).toBe(422);
	expect((await skip.json()).error.message).toBe('A report cannot go from Open to Verified.');

	expect((await patch({ status: 'confirmed', revision: 1 })).status()).toBe(200);
	const stale = await patch({ status: 'fixed', revision: 1 });
	expect(stale.status()).toBe(409);
	expect((await stale.json()).error.message).toContain('Someone changed this report since you opened it');
	expect((await patch({ status: 'fixed', revision: 2 }, crew.ctx.engineer)).status()).toBe(200);
	const done = await patch({ status: 'verified', revision: 3 });
	// The report's author (the engineer) is mailed about the reviewer's move (issue 18).
	expect(await done.json()).toEqual({ id, status: 'verified', revision: 4, changed: ['report.status'], mailed: 1 });

	const r = (await (await crew.ctx.viewer.get(`/api/teams/${crew.slug}/reports/${id}`)).json()).report;
	expect(r.history.map((h: { action: string; detail: { to?: string } }) => `${h.action}:${h.detail.to ?? ''}`)).toEqual(['report.create:', 'report.status:confirmed', 'report.status:fixed', 'report.status:verified']);
	expect(r.descriptionHtml).toContain('<strong>pi/8</strong>');
	expect(r.descriptionHtml).not.toContain('<script');
});

test('an assignee who is not a member is refused', async () => {
	const res = await crew.ctx.engineer.post(`/api/teams/${crew.slug}/reports`, { data: { traceId: trace.id, step: 13, title: 'nobody', assigneeId: 'aaaaaaaaaaaaaaaaaaaaaaaa' } });
	expect(res.status()).toBe(422);
	expect((await res.json()).error.message).toBe('The assignee must be a member of this team.');
});

test('a note edit based on an old revision gets 409, never a silent overwrite', async () => {
	const bp = await crew.ctx.engineer.post(`/api/teams/${crew.slug}/breakpoints`, { data: { circuitId: trace.circuit.id, version: trace.circuit.version, breakpoint: { kind: 'gate', gate: 12, note: 'first' } } });
	const id = (await bp.json()).breakpoint.id;
	expect((await crew.ctx.reviewer.patch(`/api/teams/${crew.slug}/breakpoints/${id}`, { data: { note: 'second', revision: 1 } })).status()).toBe(200);
	const stale = await crew.ctx.engineer.patch(`/api/teams/${crew.slug}/breakpoints/${id}`, { data: { note: 'third', revision: 1 } });
	expect(stale.status()).toBe(409);
});

test('a replay whose recomputed checksums differ from the saved ones is flagged; a faithful one is not', async ({ page }) => {
	test.setTimeout(90_000);
	await signInInBrowser(page, demo.engineer.email, demo.engineer.password);
	const slug = 'halvorsen-lab';
	const honest = await page.request.post(`/api/teams/${slug}/traces`, { data: { document: faultyAdder(`Replay check adder ${Date.now()}`), inputs: FAULT_INPUTS } });
	expect(honest.status()).toBe(201);
	const h = await honest.json();
	const saved = (await (await page.request.get(`/api/teams/${slug}/traces/${h.id}`)).json()).trace;
	// The same run, but with its keyframe checksums altered, as if the engine had changed since.
	const forged = await page.request.post(`/api/teams/${slug}/traces`, {
		data: { circuitId: saved.circuit.id, version: saved.circuit.version, inputs: saved.inputs, summary: { ...saved.summary, keyframeChecksums: saved.keyframeChecksums.map((k: { step: number }) => ({ step: k.step, checksum: '0badf00d' })) } }
	});
	expect(forged.status()).toBe(201);

	// The server's summary (Node) and the browser worker's recomputation must agree exactly.
	await page.goto(`/teams/${slug}/traces/${h.id}/replay?step=13`);
	await expect(page.getByTestId('replay-match')).toBeVisible({ timeout: 20_000 });
	await expect(page.getByTestId('replay-mismatch')).toHaveCount(0);
	await expect(page.getByTestId('step-readout')).toHaveText(/step 13 \/ 30/);

	await page.goto(`/teams/${slug}/traces/${(await forged.json()).id}/replay?step=13`);
	const warn = page.getByTestId('replay-mismatch');
	await expect(warn).toBeVisible({ timeout: 20_000 });
	await expect(warn).toContainText('This replay does not reproduce the saved trace.');
	await expect(warn).toContainText('saved 0badf00d');
});

test('orrery push uploads a failing circuit as a trace and opens a report at its divergence (exit 1)', async () => {
	test.setTimeout(60_000);
	const res = await crew.ctx.engineer.post(`/teams/${crew.slug}/tokens?/create`, { form: { name: `ci-${Date.now()}`, role: 'engineer' }, headers: { origin: formHeaders.origin, accept: 'application/json', 'x-sveltekit-action': 'true' } });
	const token = (JSON.parse((await res.json()).data) as unknown[]).find((v) => typeof v === 'string' && /^orr_[a-z2-7]{32}$/.test(v)) as string;
	const dir = await mkdtemp(join(tmpdir(), 'orrery-push-'));
	const file = join(dir, 'adder.json');
	await writeFile(file, JSON.stringify(faultyAdder(`CI adder ${Date.now()}`)));
	const run = await new Promise<{ code: number; stdout: string; stderr: string }>((resolve) =>
		execFile(process.execPath, ['--import', 'tsx', 'src/cli/push.ts', file, '--new', `CI adder ${Date.now()}`, '--spec', 'b = b + c*a mod 16', '--input', 'c=1,a=2', '--server', baseURL, '--token', token, '--json'], (err, stdout, stderr) =>
			resolve({ code: err ? Number((err as { code?: number }).code ?? 2) : 0, stdout, stderr })
		)
	);
	expect(run.code, run.stderr).toBe(1);
	const out = JSON.parse(run.stdout);
	expect(out.ok).toBe(false);
	const report = (await (await crew.ctx.viewer.get(`/api/teams/${crew.slug}/reports/${out.report.id}`)).json()).report;
	expect(report.step).toBe(13);
	expect(report.severity).toBe('high');
	expect(report.descriptionHtml).toContain('b = b + c*a mod 16');
	const trace = (await (await crew.ctx.viewer.get(`/api/teams/${crew.slug}/traces/${out.trace.id}`)).json()).trace;
	expect(trace.computedBy).toBe('server');
	expect(trace.inputs.values).toEqual({ c: '1', a: '2' });
	expect(trace.firstDivergence.label).toBe('b[3]');
});

test('deleting a report or its trace deletes the snapshots with it (they stop answering)', async () => {
	// Issue 10: a deleted report's snapshot stayed readable by its link.
	const made = await upload(TINY_PNG);
	expect(made.status()).toBe(201);
	const id = (await made.json()).id;
	const link = (await (await crew.ctx.viewer.get(`/api/teams/${crew.slug}/reports/${id}`)).json()).report.links.snapshot as string;
	expect((await crew.ctx.viewer.get(link)).status()).toBe(200);
	expect((await crew.ctx.owner.delete(`/api/teams/${crew.slug}/reports/${id}`)).status()).toBe(204);
	expect((await crew.ctx.viewer.get(link)).status()).toBe(404);

	// A trace takes its reports (by cascade) and their snapshots along.
	const other = await pushTrace(crew.ctx.engineer, crew.slug, `Doomed adder ${Date.now()}`);
	const r2 = await crew.ctx.engineer.post(`/api/teams/${crew.slug}/reports`, {
		headers: { origin: baseURL },
		multipart: { report: JSON.stringify({ traceId: other.id, step: 13, title: 'goes with its trace' }), snapshot: { name: 's.png', mimeType: 'image/png', buffer: TINY_PNG } }
	});
	expect(r2.status()).toBe(201);
	const link2 = (await (await crew.ctx.viewer.get(`/api/teams/${crew.slug}/reports/${(await r2.json()).id}`)).json()).report.links.snapshot as string;
	expect((await crew.ctx.viewer.get(link2)).status()).toBe(200);
	expect((await crew.ctx.owner.delete(`/api/teams/${crew.slug}/traces/${other.id}`)).status()).toBe(204);
	expect((await crew.ctx.viewer.get(link2)).status()).toBe(404);
});

test('a 12 MiB multipart snapshot is 413 with a sentence, not 400', async () => {
	const huge = Buffer.alloc(12 * 1024 * 1024, 0);
	TINY_PNG.copy(huge, 0, 0, 33);
	const res = await upload(huge);
	expect(res.status()).toBe(413);
	expect((await res.json()).error.message).toMatch(/^The upload is 12\.0 MiB; a snapshot may be at most 5\.0 MiB\./);
});

test('a route parameter that is not what it should be is 400 before it reaches SQL', async () => {
	const base = `/api/teams/${crew.slug}/circuits/${trace.circuit.id}/export`;
	const bad = await crew.ctx.viewer.get(`${base}?version=1%20OR%201=1`);
	expect(bad.status()).toBe(400);
	expect((await bad.json()).error.message).toBe('version must be a whole number from 1 up (the version to export).');
	expect((await crew.ctx.viewer.get(`${base}?version=${trace.circuit.version}&format=json`)).status()).toBe(200);
});
