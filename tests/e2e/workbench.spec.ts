import { readFileSync } from 'node:fs';
import { expect, test, type Locator, type Page } from '@playwright/test';
import { demo, hydrated, signInInBrowser, waitForRun } from './support/demo';

// The drag that svelte-dnd-action accepts (common practice on these machines, see STACK notes):
// press, move a few pixels, glide to the target in steps, wait for the drop line, release.
async function drag(page: Page, from: Locator, to: Locator, where: 'top' | 'bottom' = 'bottom') {
	const a = (await from.boundingBox())!;
	const b = (await to.boundingBox())!;
	const sx = a.x + Math.min(24, a.width / 2);
	const sy = a.y + a.height / 2;
	await page.mouse.move(sx, sy);
	await page.mouse.down();
	for (let i = 1; i <= 3; i++) await page.mouse.move(sx + i * 2, sy + i * 2);
	const tx = b.x + b.width / 2;
	const ty = where === 'top' ? b.y + 6 : b.y + b.height - 5;
	for (let i = 1; i <= 15; i++) await page.mouse.move(sx + ((tx - sx) * i) / 15, sy + ((ty - sy) * i) / 15);
	// Release once the drop line shows where the part goes, as a person would.
	await expect(page.getByTestId('circuit-strip').getByTestId('drop-line')).toHaveCount(1);
	await page.mouse.up();
	await page.waitForTimeout(300);
}

async function setInput(page: Page, register: string, value: string) {
	const field = page.locator(`#in-${register}`);
	await field.fill(value);
	await field.press('Tab');
}

/** Each row of the qubit table: register[index] → actual and expected angle text. */
async function tableRows(page: Page) {
	return page.locator('[data-testid=qubit-table] tbody tr').evaluateAll((rows) =>
		rows.map((r) => ({
			qubit: r.getAttribute('data-qubit'),
			actual: r.querySelector('[data-col=actual]')?.textContent?.trim() ?? '',
			expected: r.querySelector('[data-col=expected]')?.textContent?.trim() ?? ''
		}))
	);
}

test('build a 3-bit Fourier adder by dragging parts, step it, and read 5 + 6 = 3 (mod 8)', async ({ page }) => {
	test.setTimeout(120_000);
	await signInInBrowser(page, demo.engineer.email, demo.engineer.password);
	await page.goto('/teams/halvorsen-lab/circuits');
	await hydrated(page);
	await page.getByLabel('Title').fill(`Drag-built adder ${Date.now()}`);
	await page.getByLabel('Empty').check();
	await page.getByRole('button', { name: 'Create and open' }).click();
	await expect(page).toHaveURL(/\/circuits\/[a-z2-7]{24}/);
	await expect(page.getByTestId('circuit-strip')).toBeVisible();
	await waitForRun(page);

	const strip = page.getByTestId('circuit-strip');
	const shelf = page.getByTestId('parts-shelf');
	for (const kind of ['qft', 'add', 'iqft']) {
		await drag(page, shelf.locator(`[data-part="${kind}"]`), strip);
	}
	const items = strip.getByTestId('strip-item');
	await expect(items).toHaveCount(3);
	await expect(items.nth(0)).toContainText('QFT on b');
	await expect(items.nth(1)).toContainText('b += a');
	await expect(items.nth(2)).toContainText('inverse QFT on b');

	await setInput(page, 'a', '5');
	await setInput(page, 'b', '6');
	await waitForRun(page);
	await page.getByTestId('show-table').click();

	// At every block boundary the actual angles equal the expected ones (the worker's own check
	// is not trusted here: the test reads the table as a person would).
	await page.getByTestId('scrubber').fill('0');
	for (let i = 0; i < 4; i++) {
		if (i > 0) await page.getByTestId('next-boundary').click();
		await page.waitForTimeout(150);
		for (const r of await tableRows(page)) if (r.expected) expect(r.actual, `${r.qubit} at boundary ${i}`).toBe(r.expected);
	}
	await page.getByTestId('to-end').click();
	// 5 + 6 = 11 ≡ 3 (mod 8): plain arithmetic.
	await expect(page.locator('[data-register=b]')).toHaveText('3');
	await expect(page.locator('[data-register=a]')).toHaveText('5');

	// Reorder by drag: the inverse QFT before the add leaves b in the Fourier basis at the end.
	await drag(page, items.nth(2).locator('span.num').first(), items.nth(1), 'top');
	await expect(items.nth(1)).toContainText('inverse QFT on b');
	await waitForRun(page);
	await page.getByTestId('to-end').click();
	await expect(page.locator('[data-register=b]')).not.toHaveText('3');

	// Undo puts the order back, and the sum with it.
	await page.getByRole('button', { name: /undo/ }).click();
	await waitForRun(page);
	await page.getByTestId('to-end').click();
	await expect(page.locator('[data-register=b]')).toHaveText('3');
	await page.getByTestId('save').click();
	await expect(page.getByTestId('save-status')).toContainText('Saved as version 2');
});

test('the planted-fault demo diverges on b[3] at the faulty rotation, and the dials draw it', async ({ page }) => {
	test.setTimeout(120_000);
	await signInInBrowser(page, demo.engineer.email, demo.engineer.password);
	await page.goto('/teams/halvorsen-lab/circuits');
	await hydrated(page);
	await page.getByRole('link', { name: /fault planted/ }).click();
	await waitForRun(page);
	await setInput(page, 'c', '1');
	await setInput(page, 'a', '2');
	await waitForRun(page);
	await page.getByTestId('to-divergence').click();
	// The demo's rotation c·a[1] → b[3] turns 1/16 where b = b + c·a needs 2/16 = 1/8 (b[3] has level 4).
	await expect(page.getByTestId('position')).toContainText('c[0], a[1] → b[3]');
	await expect(page.getByTestId('first-divergence')).toContainText('on b[3]');
	await expect(page.getByTestId('strip-item').filter({ hasText: 'c·a[1] → b[3]' })).toContainText('diverges');
	const row = page.locator('[data-testid=qubit-table] tr[data-qubit="b[3]"]');
	await expect(row.locator('[data-col=actual]')).toHaveText('1/16');
	await expect(row.locator('[data-col=expected]')).toHaveText('1/8');
	// Arriving at the divergence selects the diverging qubit: the ledger lists b[3] at once.
	await page.getByRole('tab', { name: 'Ledger' }).click();
	await expect(page.getByTestId('ledger')).toContainText('Angle ledger · b[3]');
	await expect(page.getByTestId('ledger')).toContainText('parts from the expected angle at step');

	// The dial canvas is not blank: sample its pixels for more than the background colour.
	await page.waitForTimeout(500);
	const colours = await page.locator('[data-testid=dial-board] canvas').evaluate((c: HTMLCanvasElement) => {
		const probe = document.createElement('canvas');
		probe.width = c.width;
		probe.height = c.height;
		const ctx = probe.getContext('2d')!;
		ctx.drawImage(c, 0, 0);
		const d = ctx.getImageData(0, 0, c.width, c.height).data;
		const seen = new Set<string>();
		let red = 0;
		for (let i = 0; i < d.length; i += 16) {
			seen.add(`${d[i] >> 4},${d[i + 1] >> 4},${d[i + 2] >> 4}`);
			if (d[i] > 150 && d[i + 1] < 90 && d[i + 2] < 90) red++;
		}
		return { distinct: seen.size, red };
	});
	expect(colours.distinct).toBeGreaterThan(5);
	expect(colours.red, 'the divergence arc and needle are drawn').toBeGreaterThan(0);
	await page.screenshot({ path: 'tests/artifacts/workbench-divergence.png', fullPage: true });

	// The Check tab proves it wrong for every input and names the term: b[3] needs 1/8 of c·a[1].
	await page.getByRole('tab', { name: 'Check' }).click();
	await page.getByTestId('run-check').click();
	await expect(page.getByTestId('check-result')).toContainText('does not meet the spec', { timeout: 30_000 });
	await expect(page.getByTestId('check-result')).toContainText('512 inputs (all)');
	const term = page.getByTestId('wrong-terms').locator('tbody tr').first();
	await expect(term).toContainText('b[3]');
	await expect(term).toContainText('c[0]*a[1]');
	await expect(term).toContainText('1/8 turn');
	await expect(page.getByTestId('strip-item').filter({ hasText: 'c·a[1] → b[3]' }).getByTestId('suspect-mark')).toBeVisible();
});

test('a viewer gets the workbench read-only', async ({ page }) => {
	await signInInBrowser(page, demo.viewer.email, demo.viewer.password);
	await page.goto('/teams/halvorsen-lab/circuits');
	await hydrated(page);
	await page.getByRole('link', { name: /fault planted/ }).click();
	await waitForRun(page);
	await expect(page.getByText(/read-only for a viewer/)).toBeVisible();
	await expect(page.getByTestId('parts-shelf')).toHaveCount(0);
	await expect(page.getByTestId('save')).toHaveCount(0);
	// Stepping still works.
	await page.getByTestId('step-forward').click();
	await expect(page.getByTestId('step-readout')).toContainText('step 1 /');
});

test('an uploaded OpenQASM file with a wrong exponent stops at its line once a spec is given', async ({ page }) => {
	test.setTimeout(120_000);
	// Our hand-written 3-bit adder (Draper 2000, quant-ph/0008033) with one rotation halved.
	const good = readFileSync('src/lib/quantum/qasm/fixtures/adder3.qasm', 'utf8');
	const bad = good.replace('cu1(pi/2) a[1], b[2];', 'cu1(pi/4) a[1], b[2];');
	const line = bad.split('\n').findIndex((l) => l.startsWith('cu1(pi/4) a[1], b[2];')) + 1;
	await signInInBrowser(page, demo.engineer.email, demo.engineer.password);
	await page.goto('/teams/halvorsen-lab/circuits');
	await hydrated(page);
	await page.getByLabel('File').setInputFiles({ name: `adder-${Date.now()}.qasm`, mimeType: 'text/plain', buffer: Buffer.from(bad) });
	await page.getByRole('button', { name: 'Import' }).click();
	await expect(page).toHaveURL(/\/circuits\/[a-z2-7]{24}/);
	await waitForRun(page);
	await page.getByLabel(/One per line/).fill('b = a + b mod 8');
	await page.getByLabel(/One per line/).press('Tab');
	await setInput(page, 'a', '2');
	await waitForRun(page);
	await page.getByTestId('to-divergence').click();
	await expect(page.getByTestId('position')).toContainText(`source line ${line}`);
	await expect(page.getByTestId('first-divergence')).toContainText('on b[2]');
});

test('a malformed OpenQASM upload is refused with file:line:column and nothing is created', async ({ page }) => {
	await signInInBrowser(page, demo.engineer.email, demo.engineer.password);
	await page.goto('/teams/halvorsen-lab/circuits');
	await hydrated(page);
	const before = await page.locator('tbody tr').count();
	await page.getByLabel('File').setInputFiles({ name: 'broken.qasm', mimeType: 'text/plain', buffer: Buffer.from('OPENQASM 2.0;\ninclude "qelib1.inc";\nqreg q[2];\nfrob q[0];\n') });
	await page.getByRole('button', { name: 'Import' }).click();
	await expect(page.getByRole('alert')).toContainText('broken.qasm:4:1');
	await expect(page.locator('tbody tr')).toHaveCount(before);
});
