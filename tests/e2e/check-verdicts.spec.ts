import { expect, test, type Page } from '@playwright/test';
import { demo, hydrated, signInInBrowser, waitForRun } from './support/demo';

// The Check tab's three verdicts, in a real browser, on circuits made from the new-circuit form:
// proved (period finding over its domain), refuted (a constant planted unreduced, with the
// failing input one click from stepping) and undecided (a spec the prover cannot build, with the
// reason; the sweep still runs and says it is not a proof). Expected values are plain modular
// arithmetic: 2^e mod 21 cycles 1, 2, 4, 16, 11 with period 6, and 58 mod 21 = 16.

async function createFromTemplate(page: Page, title: string, template: RegExp, bits?: number) {
	await page.goto('/teams/halvorsen-lab/circuits');
	await hydrated(page);
	await page.getByLabel('Title').fill(title);
	if (bits !== undefined) await page.getByRole('spinbutton', { name: 'Bits' }).fill(String(bits));
	await page.getByRole('radio', { name: template }).check();
	await page.getByRole('button', { name: 'Create and open' }).click();
	await expect(page).toHaveURL(/\/circuits\/[a-z2-7]{24}/);
	await waitForRun(page);
}

async function runCheck(page: Page) {
	await page.getByRole('tab', { name: 'Check' }).click();
	await page.getByTestId('run-check').click();
	await expect(page.getByTestId('proof-verdict')).toBeVisible({ timeout: 90_000 });
}

test('period finding: proved over its domain, then a planted unreduced constant is refuted and stepped to the ancilla that goes wrong', async ({ page }) => {
	test.setTimeout(240_000);
	await signInInBrowser(page, demo.engineer.email, demo.engineer.password);
	await createFromTemplate(page, `Period finding check ${Date.now()}`, /Period finding N = 21, a = 2/);

	await runCheck(page);
	const verdict = page.getByTestId('proof-verdict');
	await expect(verdict).toHaveAttribute('data-status', 'proved');
	await expect(verdict).toContainText('Proved for every input');
	// the domain: y = 1 and every 9-bit exponent, 512 of the 2^14 basis inputs
	await expect(verdict).toContainText('domain: y == 1 — 512 of 16384 basis inputs');
	await expect(page.getByTestId('check-domain')).toContainText('512 inputs inside it, every one checked');
	await expect(page.getByTestId('check-result')).toContainText('meets the spec');

	// Plant the fault: the multiplier for exponent bit 2 gets 58 where 58 mod 21 = 16 belongs.
	await page.getByTestId('circuit-strip').getByRole('button', { name: /if e\[2\]:/ }).click();
	await page.getByRole('tab', { name: 'Item' }).click();
	const value = page.getByTestId('mod-value');
	await expect(value).toHaveValue('16');
	await value.fill('58');
	await value.press('Tab');
	await expect(page.getByText(/a = 58 is not reduced mod N = 21 \(a mod N = 16\)/)).toBeVisible();
	await waitForRun(page);

	await runCheck(page);
	await expect(verdict).toHaveAttribute('data-status', 'refuted');
	await expect(verdict).toContainText('Refuted: a failing input');
	await expect(page.getByTestId('check-result')).toContainText('does not meet the spec');
	await expect(page.getByTestId('check-scope')).toContainText('unsaved edits');
	// The prover's input has exponent bit 2 set (bits 0 and 1 alone never reach the planted part).
	const button = page.getByTestId('step-counterexample');
	const text = (await button.textContent()) ?? '';
	const e = Number(/e=(\d+)/.exec(text)?.[1]);
	expect(e & 4).toBe(4);
	await expect(button).toContainText('y=1');
	await button.click();
	await expect(page.locator('#in-e')).toHaveValue(String(e));
	await waitForRun(page);

	// Step to the first divergence: the comparison ancilla, whose expected bit is the comparison
	// b + a < N that the unreduced constant makes fail.
	await expect(page.getByTestId('first-divergence')).toContainText('on anc[0]');
	const at = Number(/at step (\d+)/.exec((await page.getByTestId('first-divergence').textContent()) ?? '')?.[1]);
	await page.getByTestId('scrubber').fill(String(at));
	await page.getByTestId('show-table').click();
	const row = page.locator('[data-testid=qubit-table] tr[data-qubit="anc[0]"]');
	await expect(row.locator('[data-col=note]')).toHaveText(/^b \+ a < N: \d+ \+ 58 < 21 fails$/);
	await expect(row.locator('[data-col=divergence]')).toContainText('expected |0⟩');
	await page.screenshot({ path: 'tests/artifacts/check-period-finding-divergence.png' });
});

test('a spec the prover cannot build is undecided, with the reason, and the sweep says it is not a proof', async ({ page }) => {
	test.setTimeout(120_000);
	await signInInBrowser(page, demo.engineer.email, demo.engineer.password);
	await createFromTemplate(page, `Undecided adder ${Date.now()}`, /Fourier adder/, 3);
	// A register exponent with a register base: the general prover builds only a constant base.
	// (Without a domain the Fourier-form prover expands b^a over the bits and proves it; a domain
	// that every input meets makes the general prover take it.)
	const spec = page.locator('#spec-text');
	await spec.fill('b = a + b + (b^a - b^a) mod 8');
	await spec.press('Tab');
	const domain = page.getByTestId('domain-text');
	await domain.fill('a < 8');
	await domain.press('Tab');
	await runCheck(page);
	const verdict = page.getByTestId('proof-verdict');
	await expect(verdict).toHaveAttribute('data-status', 'undecided');
	await expect(verdict).toContainText('Not decided by the prover');
	await expect(verdict).toContainText('constant base');
	await expect(page.getByTestId('check-result')).toContainText('meets the spec');
	await expect(page.getByTestId('check-result')).toContainText('64 inputs (all)');
});
