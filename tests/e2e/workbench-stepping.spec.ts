import { expect, test, type Page } from '@playwright/test';
import { demo, hydrated, signInInBrowser, waitForRun } from './support/demo';
import { FAULT_INPUTS, faultyAdder } from './support/review';

// Issue 17: "to breakpoint" (button and key) in the workbench and in the reviewer's replay. The
// breakpoint list used to reach the worker as a reactive proxy, which postMessage cannot clone.

const SLUG = 'halvorsen-lab';

async function setInput(page: Page, register: string, value: string) {
	const field = page.locator(`#in-${register}`);
	await field.fill(value);
	await field.press('Tab');
}
function watchErrors(page: Page): string[] {
	const seen: string[] = [];
	page.on('console', (m) => m.type() === 'error' && seen.push(m.text()));
	page.on('pageerror', (e) => seen.push(String(e)));
	return seen;
}

test('to breakpoint stops at a gate breakpoint, by button and by key, in the workbench', async ({ page }) => {
	test.setTimeout(90_000);
	const errors = watchErrors(page);
	await signInInBrowser(page, demo.engineer.email, demo.engineer.password);
	await page.goto(`/teams/${SLUG}/circuits`);
	await hydrated(page);
	await page.getByRole('link', { name: /fault planted/ }).click();
	await hydrated(page);
	await waitForRun(page);
	await setInput(page, 'c', '1');
	await setInput(page, 'a', '2');
	await waitForRun(page);
	await page.getByRole('tab', { name: 'Breakpoints' }).click();
	await page.getByLabel(/^at step/).fill('12');
	await page.getByRole('button', { name: 'add breakpoint' }).click();
	await page.getByTestId('to-start').click();
	await expect(page.getByTestId('step-readout')).toHaveText(/step 0 \//);
	await page.getByTestId('to-breakpoint').click();
	await expect(page.getByTestId('step-readout')).toHaveText(/step 12 \//);
	// The key: back to the start with 0, then g.
	await page.locator('body').click({ position: { x: 2, y: 2 } });
	await page.keyboard.press('0');
	await expect(page.getByTestId('step-readout')).toHaveText(/step 0 \//);
	await page.keyboard.press('g');
	await expect(page.getByTestId('step-readout')).toHaveText(/step 12 \//);
	expect(errors.filter((e) => /DataCloneError|could not be cloned/i.test(e))).toEqual([]);
});

test("to breakpoint works in the reviewer's replay on the team's saved breakpoint", async ({ browser }) => {
	test.setTimeout(90_000);
	const engCtx = await browser.newContext();
	const eng = await engCtx.newPage();
	await signInInBrowser(eng, demo.engineer.email, demo.engineer.password);
	const pushed = await eng.request.post(`/api/teams/${SLUG}/traces`, { data: { document: faultyAdder(`Replay to breakpoint ${Date.now()}`), inputs: FAULT_INPUTS } });
	expect(pushed.status(), await pushed.text()).toBe(201);
	const trace = (await pushed.json()) as { id: string; circuit: { id: string; version: number } };
	const bp = await eng.request.post(`/api/teams/${SLUG}/breakpoints`, {
		data: { circuitId: trace.circuit.id, version: trace.circuit.version, breakpoint: { kind: 'gate', gate: 12, note: 'the halved rotation' } }
	});
	expect(bp.status(), await bp.text()).toBe(201);
	await engCtx.close();

	const revCtx = await browser.newContext();
	const page = await revCtx.newPage();
	const errors = watchErrors(page);
	await signInInBrowser(page, demo.reviewer.email, demo.reviewer.password);
	await page.goto(`/teams/${SLUG}/traces/${trace.id}/replay?step=0`);
	await hydrated(page);
	await waitForRun(page);
	await expect(page.getByTestId('step-readout')).toHaveText(/step 0 \//);
	await page.getByTestId('to-breakpoint').click();
	await expect(page.getByTestId('step-readout')).toHaveText(/step 12 \//);
	expect(errors.filter((e) => /DataCloneError|could not be cloned/i.test(e))).toEqual([]);
	await revCtx.close();
});
