import { expect, test, type Locator, type Page } from '@playwright/test';
import { demo, hydrated, signInInBrowser, waitForRun } from './support/demo';

// Issue 17: a part dropped below the last strip item lands at the end (it used to land before
// the last item), and a part grabbed anywhere on its card moves.

/** Press at (fx, ½) of `from` (fraction of its width), glide to the point (tx, ty) with real mouse
 * moves; `whileHeld` runs before the release (to look at the drop line). */
async function dragTo(page: Page, from: Locator, fx: number, tx: number, ty: number, whileHeld?: () => Promise<void>) {
	const a = (await from.boundingBox())!;
	const sx = a.x + a.width * fx;
	const sy = a.y + a.height / 2;
	await page.mouse.move(sx, sy);
	await page.mouse.down();
	for (let i = 1; i <= 3; i++) await page.mouse.move(sx + i * 2, sy + i * 2);
	for (let i = 1; i <= 15; i++) await page.mouse.move(sx + ((tx - sx) * i) / 15, sy + ((ty - sy) * i) / 15);
	await page.waitForTimeout(200);
	await whileHeld?.();
	await page.mouse.up();
	await page.waitForTimeout(300);
}

test('a part grabbed by the middle of its card and dropped below the last item lands at the end, with a drop line on the way', async ({ page }) => {
	test.setTimeout(90_000);
	await signInInBrowser(page, demo.engineer.email, demo.engineer.password);
	await page.setViewportSize({ width: 1440, height: 900 });
	await page.goto('/teams/halvorsen-lab/circuits');
	await hydrated(page);
	await page.getByLabel('Title').fill(`Drop at the end ${Date.now()}`);
	await page.getByLabel(/Fourier adder/).check();
	await page.getByRole('button', { name: 'Create and open' }).click();
	await expect(page).toHaveURL(/\/circuits\/[a-z2-7]{24}/);
	await hydrated(page);
	await waitForRun(page);
	const strip = page.getByTestId('circuit-strip');
	const items = strip.getByTestId('strip-item');
	await expect(items).toHaveCount(3);
	const last = (await items.nth(2).boundingBox())!;
	// Grab the "Add constant" card in its blank middle, drop 12 px under the last item. While held, one
	// copper line marks the place, after item 3.
	await dragTo(page, page.getByTestId('parts-shelf').locator('[data-part="add-const"]'), 0.5, last.x + last.width / 2, last.y + last.height + 12, async () => {
		await expect(strip.getByTestId('drop-line')).toHaveCount(1);
		await expect(strip.getByTestId('drop-line')).toHaveAttribute('data-drop-at', '4');
		await expect(strip.getByTestId('drop-line')).toContainText('drops here, as item 4');
	});
	await expect(items).toHaveCount(4);
	await expect(strip.getByTestId('drop-line')).toHaveCount(0);
	await expect(items.nth(2)).toContainText('inverse QFT on b');
	await expect(items.nth(3)).toContainText('b += 1');
	// A strip item grabbed by its title (a control, once refused by the drag) moves too: the new last item dragged above the first.
	const first = (await items.nth(0).boundingBox())!;
	await dragTo(page, items.nth(3).locator('[role=button]').first(), 0.5, first.x + first.width / 2, first.y + 4, async () => {
		await expect(strip.getByTestId('drop-line')).toHaveAttribute('data-drop-at', '1');
	});
	await expect(items.nth(0)).toContainText('b += 1');
	await expect(items.nth(1)).toContainText('QFT on b');
});
