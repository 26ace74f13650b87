import { expect, test } from '@playwright/test';
import { demo, hydrated, signInInBrowser, waitForRun } from './support/demo';

// The circuits list refreshes itself every few seconds (server checks finish on their own). A
// refresh that fired while a click was still loading the workbench replaced that navigation, so
// the click did nothing: seen on a busy machine, where loading the workbench took over 5 s.

const SLUG = 'halvorsen-lab';

test('a click on a circuit opens it even when the list refreshes while the workbench loads', async ({ page }) => {
	test.setTimeout(90_000);
	await signInInBrowser(page, demo.engineer.email, demo.engineer.password);
	await page.goto(`/teams/${SLUG}/circuits`);
	await hydrated(page);
	// The workbench's data arrives later than the list's next refresh (every 5 s, 1.5 s while a check runs).
	await page.route(/\/circuits\/[a-z0-9]+\/__data\.json/, async (route) => {
		await new Promise((r) => setTimeout(r, 7000));
		await route.continue();
	});
	let listRefreshes = 0;
	page.on('request', (r) => {
		if (/\/circuits\/__data\.json/.test(r.url())) listRefreshes++;
	});
	await page.getByRole('link', { name: /fault planted/ }).click();
	await expect(page).toHaveURL(/\/circuits\/[a-z0-9]{24}/, { timeout: 30_000 });
	await waitForRun(page);
	await expect(page.getByTestId('dial-board')).toBeVisible();
	// The list did not refresh itself underneath the navigation.
	expect(listRefreshes).toBe(0);
});
