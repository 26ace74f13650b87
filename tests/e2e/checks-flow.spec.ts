import { expect, test, type Page } from '@playwright/test';
import { demo, hydrated } from './support/demo';

// End to end in Chromium: a saved version is checked by the server's worker (not the browser),
// the workbench follows it with a progress bar, an engineer can cancel one, and the circuits table
// turns to the server's verdict on its own, without a reload.

/** Sign in through the form; argon2 on a loaded 2-core machine can take longer than the default 10 s. */
async function signIn(page: Page, email: string, password: string) {
	await page.goto('/signin');
	await hydrated(page);
	await page.getByLabel('E-mail').fill(email);
	await page.getByLabel('Password').fill(password);
	await page.getByRole('button', { name: 'Sign in' }).click();
	await expect(page).not.toHaveURL(/\/signin/, { timeout: 60_000 });
}

test('save a version, watch the server check run, and see its verdict in the circuits table without a reload', async ({ page }) => {
	test.setTimeout(1_200_000);
	await signIn(page, demo.engineer.email, demo.engineer.password);
	await page.goto('/teams/halvorsen-lab/circuits');
	await hydrated(page);
	const title = `Queue flow adder ${Date.now()}`;
	await page.getByLabel('Title').fill(title);
	await page.getByLabel('Bits', { exact: true }).fill('10');
	await page.getByRole('radio', { name: /Fourier adder/ }).check();
	await page.getByRole('button', { name: 'Create and open' }).click();
	await expect(page).toHaveURL(/\/circuits\/[a-z2-7]{24}/);
	await hydrated(page);

	// Version 1 was queued on creation (a 10-bit adder: 2^20 inputs, far longer than a click): cancel it from the status panel.
	const panel = page.getByTestId('server-check');
	await expect(panel).toHaveAttribute('data-status', /queued|running/, { timeout: 30_000 });
	await panel.getByRole('button', { name: 'Cancel check' }).click();
	await expect(panel).toHaveAttribute('data-status', 'cancelled');
	await expect(panel.getByTestId('server-verdict')).toHaveText('cancelled, no verdict');

	// Save version 2: the save queues a server check, which the panel picks up and follows.
	await page.getByLabel('Circuit title').fill(`${title} v2`);
	await page.getByLabel('Circuit title').press('Tab');
	await page.getByTestId('save').click();
	await expect(page.getByTestId('save-status')).toHaveText('Saved as version 2.');
	await expect(panel).toContainText('v2', { timeout: 30_000 });
	const bar = panel.getByTestId('check-progress');
	await expect(bar).toBeVisible({ timeout: 120_000 });
	await expect(panel).toContainText(/shards \d+\/16/);

	// To the circuits table by the breadcrumb (client-side navigation), then no reload at all.
	let loads = 0;
	page.on('load', () => loads++);
	await page.getByRole('navigation', { name: 'Breadcrumb' }).getByRole('link', { name: 'Circuits' }).click();
	await expect(page).toHaveURL(/\/circuits$/);
	const badge = page.getByRole('row', { name: new RegExp(`${title} v2`) }).locator('[data-check-status]');
	await expect(badge).toHaveAttribute('data-check-status', /queued|running/);
	await expect(badge).toHaveAttribute('data-check-status', 'pass', { timeout: 900_000 });
	await expect(badge).toContainText('passed');
	await expect(badge).toHaveAttribute('title', /Server check of v2: proof and exhaustive sweep, 1\u2009048\u2009576 inputs/);
	expect(loads).toBe(0);
});
