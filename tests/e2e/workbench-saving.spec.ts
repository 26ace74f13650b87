import { expect, test, type Page } from '@playwright/test';
import { demo, hydrated, signInInBrowser, waitForRun } from './support/demo';

// Issue 17: what a save means. After "Save v2" everything made on the page belongs to v2; a check
// of unsaved edits never becomes a saved version's verdict; a spec-only edit can be saved; leaving
// with unsaved edits asks first.

const SLUG = 'halvorsen-lab';

/** A fresh 3-bit Fourier adder (template) opened in the workbench; returns its id. */
async function freshAdder(page: Page, title: string): Promise<string> {
	await signInInBrowser(page, demo.engineer.email, demo.engineer.password);
	await page.goto(`/teams/${SLUG}/circuits`);
	await hydrated(page);
	await page.getByLabel('Title').fill(title);
	await page.getByLabel(/Fourier adder/).check();
	await page.getByRole('button', { name: 'Create and open' }).click();
	await expect(page).toHaveURL(/\/circuits\/[a-z2-7]{24}/);
	await hydrated(page);
	await waitForRun(page);
	return page.url().match(/circuits\/([a-z2-7]{24})/)![1];
}
async function retitle(page: Page, title: string) {
	const field = page.getByLabel('Circuit title');
	await field.fill(title);
	await field.press('Tab');
}

test('after Save v2 the trace, the report and the team breakpoint made on the page belong to v2', async ({ page }) => {
	test.setTimeout(120_000);
	const title = `Saved twice ${Date.now()}`;
	const id = await freshAdder(page, title);
	await retitle(page, `${title} (edited)`);
	await page.getByTestId('save').click();
	await expect(page.getByTestId('save-status')).toContainText('Saved as version 2');

	// A breakpoint, saved for the team.
	await page.getByRole('tab', { name: 'Breakpoints' }).click();
	await page.getByLabel('Note').fill('after the save');
	await page.getByRole('button', { name: 'add breakpoint' }).click();
	await page.getByRole('tab', { name: 'Share' }).click();
	await expect(page.getByTestId('share-panel')).not.toContainText('on v1');
	await page.getByTestId('save-breakpoint').click();
	await expect(page.getByTestId('share-panel').getByTestId('saved-breakpoint')).toHaveCount(1);
	const bps = await (await page.request.get(`/api/teams/${SLUG}/breakpoints?circuit=${id}&version=2`)).json();
	expect(bps.breakpoints.map((b: { note: string }) => b.note)).toContain('after the save');

	// The trace.
	await page.getByTestId('save-trace').click();
	const link = page.getByTestId('trace-replay-link');
	await expect(link).toBeVisible();
	const traceId = (await link.getAttribute('href'))!.match(/traces\/([a-z2-7]{24})/)![1];
	const trace = await (await page.request.get(`/api/teams/${SLUG}/traces/${traceId}`)).json();
	expect(trace.trace.circuit.version).toBe(2);

	// The report opened from the frame.
	await page.getByTestId('share-panel').getByLabel('Title').fill('reported after the save');
	await page.getByTestId('open-report').click();
	await expect(page.getByTestId('report-link')).toBeVisible();
	const reportId = (await page.getByTestId('report-link').getAttribute('href'))!.match(/reports\/([a-z2-7]{24})/)![1];
	const report = await (await page.request.get(`/api/teams/${SLUG}/reports/${reportId}`)).json();
	expect(report.report.trace.version).toBe(2);
});

test("a check of unsaved edits is shown as such and never becomes the saved version's verdict", async ({ page }) => {
	test.setTimeout(120_000);
	const title = `Checked unsaved ${Date.now()}`;
	await freshAdder(page, title);
	// Break the saved (correct) adder without saving: drop its inverse QFT.
	await page.getByRole('button', { name: 'Delete item 3' }).click();
	await waitForRun(page);
	await page.getByRole('tab', { name: 'Check' }).click();
	await page.getByTestId('run-check').click();
	await expect(page.getByTestId('check-result')).toContainText('does not meet the spec', { timeout: 30_000 });
	// The circuits table does not list version 1 as failing (read in a second tab: this one keeps its edits).
	await page.waitForTimeout(500);
	const table = await page.context().newPage();
	await table.goto(`/teams/${SLUG}/circuits`);
	await expect(table.locator('tr', { hasText: title })).toBeVisible();
	await expect(table.locator('tr', { hasText: title })).not.toContainText(/fail/i);
	await table.close();
	await expect(page.getByTestId('check-scope')).toContainText('unsaved edits');
});

test('an edit of the spec alone can be saved and is there after a reload', async ({ page }) => {
	test.setTimeout(90_000);
	await freshAdder(page, `Spec only ${Date.now()}`);
	const spec = page.getByLabel(/One per line/);
	await spec.fill('b = a + b mod 8\na = a');
	// No blur: Save is ready as soon as the spec is a valid edit.
	await expect(page.getByTestId('save')).toBeEnabled();
	await page.getByTestId('save').click();
	await expect(page.getByTestId('save-status')).toContainText('Saved as version 2');
	await page.reload();
	await hydrated(page);
	await expect(page.getByLabel(/One per line/)).toHaveValue('b = a + b mod 8\na = a');
});

test('leaving the workbench with unsaved edits asks first, inside the app and when the tab closes', async ({ page }) => {
	test.setTimeout(90_000);
	await freshAdder(page, `Leave warning ${Date.now()}`);
	const here = page.url();
	await retitle(page, 'not saved yet');
	// A link inside the app: the question comes, and dismissing it stays. The handler is set before
	// the click, which itself waits while a confirm is open.
	let asked = '';
	page.once('dialog', (d) => {
		asked = d.message();
		void d.dismiss();
	});
	await page.getByRole('navigation', { name: 'Breadcrumb' }).getByRole('link', { name: 'Circuits' }).click();
	await expect.poll(() => asked).toMatch(/unsaved/i);
	await page.waitForTimeout(300);
	expect(page.url()).toBe(here);
	await expect(page.getByLabel('Circuit title')).toHaveValue('not saved yet');
	// Closing the tab: the browser's own beforeunload question.
	let kind = '';
	page.once('dialog', (d) => {
		kind = d.type();
		void d.accept();
	});
	await page.close({ runBeforeUnload: true });
	await expect.poll(() => kind).toBe('beforeunload');
});

test('the version picker moves inside the app: no reload, older versions read-only, and unsaved edits ask first', async ({ page }) => {
	test.setTimeout(120_000);
	await freshAdder(page, `Picker ${Date.now()}`);
	await page.getByLabel(/One per line/).fill('b = a + b mod 8\na = a');
	await page.getByTestId('save').click();
	await expect(page.getByTestId('save-status')).toContainText('Saved as version 2');
	// A marker on the window survives only a client-side navigation.
	await page.evaluate(() => ((window as unknown as { orreryMark: number }).orreryMark = 17));
	const picker = page.getByLabel('version', { exact: true });
	await picker.selectOption('1');
	await expect(page).toHaveURL(/\?version=1$/);
	await expect(page.getByText('an older version: read-only')).toBeVisible();
	await expect(picker).toHaveValue('1');
	expect(await page.evaluate(() => (window as unknown as { orreryMark?: number }).orreryMark)).toBe(17);

	// Back to v2, edit, and pick v1 again: the question comes; staying keeps the edit and the picker.
	await picker.selectOption('2');
	await expect(page).toHaveURL(/\?version=2$/);
	await hydrated(page);
	await waitForRun(page);
	await retitle(page, 'edited, not saved');
	let asked = '';
	page.once('dialog', (d) => {
		asked = d.message();
		void d.dismiss();
	});
	await picker.selectOption('1');
	await expect.poll(() => asked).toMatch(/unsaved/i);
	await page.waitForTimeout(300);
	await expect(page).toHaveURL(/\?version=2$/);
	await expect(picker).toHaveValue('2');
	await expect(page.getByLabel('Circuit title')).toHaveValue('edited, not saved');
	expect(await page.evaluate(() => (window as unknown as { orreryMark?: number }).orreryMark)).toBe(17);
});
