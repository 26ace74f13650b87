import { expect, test, type Locator, type Page } from '@playwright/test';
import { demo, signInInBrowser } from './support/demo';

// Issue 17: a part dropped below the last strip item lands at the end (it used to land before
// the last item), and a part grabbed anywhere on its card moves.

async function hydrated(page: Page) {
	await page.waitForFunction(() => document.documentElement.dataset.hydrated === 'true');
}
async function waitForRun(page: Page) {
	await expect(page.getByTestId('run-summary')).toBeVisible({ timeout: 30_000 });
	await page.waitForTimeout(400); // the re-run after an edit is debounced by 200 ms
}
/** Press at (fx, fy) of `from` (fractions of its box), glide to the point (tx, ty), release. */
async function dragTo(page: Page, from: Locator, fx: number, tx: number, ty: number) {
	const a = (await from.boundingBox())!;
	const sx = a.x + a.width * fx;
	const sy = a.y + a.height / 2;
	await page.mouse.move(sx, sy);
	await page.mouse.down();
	for (let i = 1; i <= 3; i++) await page.mouse.move(sx + i * 2, sy + i * 2);
	for (let i = 1; i <= 15; i++) await page.mouse.move(sx + ((tx - sx) * i) / 15, sy + ((ty - sy) * i) / 15);
	await page.waitForTimeout(200);
	await page.mouse.up();
	await page.waitForTimeout(300);
}

// Not fixed yet (issue 17): this test reproduces the bug and fails on svelte-dnd-action's
// placement; fixme keeps it visible until the drop is fixed.
test.fixme('a part grabbed by the middle of its card and dropped below the last item lands at the end', async ({ page }) => {
	test.setTimeout(90_000);
	await signInInBrowser(page, demo.engineer.email, demo.engineer.password);
	await page.goto('/teams/halvorsen-lab/circuits');
	await hydrated(page);
	await page.getByLabel('Title').fill(`Drop at the end ${Date.now()}`);
	await page.getByLabel(/Fourier adder/).check();
	await page.getByRole('button', { name: 'Create and open' }).click();
	await expect(page).toHaveURL(/\/circuits\/[a-z2-7]{24}/);
	await hydrated(page);
	await waitForRun(page);
	const items = page.getByTestId('circuit-strip').getByTestId('strip-item');
	await expect(items).toHaveCount(3);
	const last = (await items.nth(2).boundingBox())!;
	// Grab the card in its middle, drop 12 px under the last item.
	await dragTo(page, page.getByTestId('parts-shelf').locator('[data-part="gate-h"]'), 0.5, last.x + last.width / 2, last.y + last.height + 12);
	await expect(items).toHaveCount(4);
	await expect(items.nth(2)).toContainText('inverse QFT on b');
	await expect(items.nth(3)).toContainText(/\bh\b|Hadamard/i);
});
