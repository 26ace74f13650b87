import { expect, test, type Page } from '@playwright/test';
import { pathOf, waitForMail } from './support/accounts';
import { demo, hydrated, signInInBrowser, waitForRun } from './support/demo';

// Issue 7 end to end, two people in two browsers: the engineer finds the demo's planted fault
// (invented demo data: rotation c·a[1] → b[3] is pi/8 instead of pi/4), drops an annotated
// breakpoint on it, snapshots the frame into a report for the reviewer; the reviewer follows the
// e-mail to the replay at that step, reads the note, comments and moves the report to verified.

async function setInput(page: Page, register: string, value: string) {
	const field = page.locator(`#in-${register}`);
	await field.fill(value);
	await field.press('Tab');
}
async function changeStatus(page: Page, to: string) {
	await page.getByLabel('Change to').selectOption({ label: to });
	await page.getByRole('button', { name: 'Change status' }).click();
	await expect(page.getByTestId('report-history')).toContainText(`to ${to}`);
}
/** Distinct colours in an <img>, to tell a real capture from a blank one. */
async function distinctColours(page: Page, testid: string): Promise<{ width: number; colours: number }> {
	return page.getByTestId(testid).evaluate(async (img: HTMLImageElement) => {
		await img.decode();
		const c = document.createElement('canvas');
		c.width = img.naturalWidth;
		c.height = img.naturalHeight;
		const g = c.getContext('2d')!;
		g.drawImage(img, 0, 0);
		const d = g.getImageData(0, 0, c.width, c.height).data;
		const seen = new Set<string>();
		for (let i = 0; i < d.length; i += 32) seen.add(`${d[i] >> 4},${d[i + 1] >> 4},${d[i + 2] >> 4}`);
		return { width: img.naturalWidth, colours: seen.size };
	});
}

test('engineer reports the planted fault with a snapshot; the reviewer replays it from the e-mail, comments and verifies', async ({ browser }) => {
	test.setTimeout(180_000);
	const engineerCtx = await browser.newContext();
	const reviewerCtx = await browser.newContext();
	const eng = await engineerCtx.newPage();
	const rev = await reviewerCtx.newPage();
	const title = `Rotation c·a[1] → b[3] is half what it should be (${Date.now()})`;

	// The engineer opens the demo and runs to the divergence with c=1, a=2.
	await signInInBrowser(eng, demo.engineer.email, demo.engineer.password);
	await eng.goto('/teams/halvorsen-lab/circuits');
	await hydrated(eng);
	await eng.getByRole('link', { name: /fault planted/ }).click();
	await waitForRun(eng);
	await setInput(eng, 'c', '1');
	await setInput(eng, 'a', '2');
	await waitForRun(eng);
	await eng.getByTestId('to-divergence').click();
	await expect(eng.getByTestId('position')).toContainText('c[0], a[1] → b[3]');
	await expect(eng.getByTestId('step-readout')).toHaveText(/step 13 \/ 30/);

	// A breakpoint on the faulty rotation (stop at step 12, before the gate of step 13), with a markdown note.
	await eng.getByRole('tab', { name: 'Breakpoints' }).click();
	await eng.getByLabel('Note').fill('The **rotation** c·a[1] → b[3] turns pi/8; it should be pi/4.');
	await eng.getByRole('button', { name: 'add breakpoint' }).click();
	await expect(eng.getByTestId('breakpoints')).toContainText('at step 12, before the gate of step 13');

	// Share tab: save it for the team, capture the frame, open the report.
	await eng.getByRole('tab', { name: 'Share' }).click();
	await eng.getByTestId('save-breakpoint').click();
	const saved = eng.getByTestId('share-panel').getByTestId('saved-breakpoint').filter({ hasText: 'at step 12, before the gate of step 13' }).last();
	await expect(saved.getByTestId('breakpoint-note').locator('strong')).toHaveText('rotation');
	await expect(saved).toContainText('at this step');
	await eng.getByTestId('capture-frame').click();
	await expect(eng.getByTestId('snapshot-preview')).toBeVisible();
	const preview = await distinctColours(eng, 'snapshot-preview');
	expect(preview.width).toBeGreaterThan(400);
	expect(preview.colours, 'the snapshot shows dials and table, not a blank area').toBeGreaterThan(8);
	const form = eng.getByTestId('share-panel');
	await form.getByLabel('Title').fill(title);
	await form.getByLabel('Description (markdown)').fill('With c=1, a=2 the dial of b[3] stops at 1/16 where **1/8** is expected.');
	await form.getByLabel('Severity').selectOption({ label: 'High' });
	await form.getByLabel('Assignee').selectOption({ label: `${demo.reviewer.name} (reviewer)` });
	await form.getByLabel('Reviewer').selectOption({ label: `${demo.owner.name} (owner)` });
	await eng.getByTestId('open-report').click();
	await expect(eng.getByTestId('report-link')).toBeVisible();
	const reportPath = (await eng.getByTestId('report-link').getAttribute('href'))!;

	// The reviewer gets the e-mail and follows its link to the replay at step 13.
	const mail = await waitForMail(demo.reviewer.email, '/replay');
	expect(mail.subject).toContain(title);
	expect(mail.text).toContain('at step 13');
	await signInInBrowser(rev, demo.reviewer.email, demo.reviewer.password);
	await rev.goto(pathOf(mail.link));
	await hydrated(rev);
	await expect(rev.getByTestId('step-readout')).toHaveText(/step 13 \/ 30/, { timeout: 20_000 });
	await expect(rev.getByTestId('position')).toContainText('c[0], a[1] → b[3]');
	await expect(rev.getByTestId('replay-match')).toBeVisible();
	const note = rev.getByTestId('saved-breakpoints').getByTestId('saved-breakpoint').filter({ hasText: 'should be pi/4' }).last();
	await expect(note).toBeVisible();
	await expect(note).toContainText('at this step');
	// The owner (the report's reviewer) was mailed too.
	await waitForMail(demo.owner.email, '/replay');

	// On the report: the snapshot, a comment, and the status moves.
	await rev.getByTestId('replay-report-link').click();
	await expect(rev.getByTestId('report-title')).toHaveText(title);
	const shot = await distinctColours(rev, 'report-snapshot');
	expect(shot.width).toBe(preview.width);
	expect(shot.colours).toBeGreaterThan(8);
	await rev.getByLabel('Comment (markdown)').fill('Confirmed on the replay: b[3] holds 1/16 at step 13.');
	await rev.getByRole('button', { name: 'Add comment' }).click();
	await expect(rev.getByTestId('report-comments')).toContainText('Confirmed on the replay');
	await changeStatus(rev, 'Confirmed');

	// The engineer sees it confirmed, and marks it fixed.
	await eng.goto(reportPath);
	await hydrated(eng);
	await expect(eng.getByTestId('status-badge').first()).toHaveText(/Confirmed/);
	await expect(eng.getByTestId('report-comments')).toContainText('Confirmed on the replay');
	await changeStatus(eng, 'Fixed');

	// The reviewer verifies; the engineer sees the change and who made it.
	await rev.reload();
	await changeStatus(rev, 'Verified');
	await eng.reload();
	await expect(eng.getByTestId('status-badge').first()).toHaveText(/Verified/);
	await expect(eng.getByTestId('report-history')).toContainText(`${demo.reviewer.name} changed the status from Fixed to Verified`);
	await eng.screenshot({ path: 'tests/artifacts/report-verified.png', fullPage: true });

	await engineerCtx.close();
	await reviewerCtx.close();
});
