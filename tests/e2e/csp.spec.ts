import { expect, test, type Page } from '@playwright/test';
import { demo, hydrated, signInInBrowser, waitForRun } from './support/demo';
import { FAULT_INPUTS, faultyAdder } from './support/review';

// Issue 10: every page carries the content security policy of kit.csp (svelte.config.js), with no
// 'unsafe-eval' and no 'unsafe-inline' for scripts, and the app still works under it: the landing,
// sign-in, the workbench (pixi dial board drawn, stepping, a snapshot through html-to-image), a
// report page (with its server-drawn board) and the replay. Any securitypolicyviolation event on
// a page, or a CSP error in the console (workers included), fails the test.

const SLUG = 'halvorsen-lab';

type Watch = { violations: () => Promise<string[]>; console: string[] };

async function watchCsp(page: Page): Promise<Watch> {
	// Init scripts are injected by the browser's debugging protocol, so the policy does not stop them.
	await page.addInitScript(() => {
		const w = window as unknown as { __csp: string[] };
		w.__csp = [];
		document.addEventListener('securitypolicyviolation', (e) => w.__csp.push(`${e.violatedDirective} blocked ${e.blockedURI || '(inline)'} at ${e.sourceFile}:${e.lineNumber}`));
	});
	const seen: string[] = [];
	page.on('console', (m) => {
		if (/Content Security Policy|Refused to (execute|load|apply|create|evaluate|connect|frame)/i.test(m.text())) seen.push(m.text());
	});
	return { violations: () => page.evaluate(() => (window as unknown as { __csp?: string[] }).__csp ?? []), console: seen };
}

async function expectClean(page: Page, w: Watch, where: string) {
	expect(await w.violations(), `policy violations on ${where}`).toEqual([]);
	expect(w.console, `CSP errors in the console on ${where}`).toEqual([]);
}

test('pages get a nonce-based policy without unsafe-eval, and each page works under it', async ({ browser }) => {
	test.setTimeout(150_000);
	const ctx = await browser.newContext();
	const page = await ctx.newPage();
	const w = await watchCsp(page);

	// The landing page: the header is kit.csp's policy.
	const res = await page.goto('/');
	const csp = res!.headers()['content-security-policy'];
	const scriptSrc = /script-src ([^;]*)/.exec(csp)?.[1] ?? '';
	expect(scriptSrc).toMatch(/'self'/);
	expect(scriptSrc).toMatch(/'nonce-[A-Za-z0-9+/=]+'/);
	expect(scriptSrc).not.toContain('unsafe-inline');
	expect(csp).not.toContain('unsafe-eval');
	for (const d of ["frame-ancestors 'none'", "object-src 'none'", "base-uri 'self'", "form-action 'self'"]) expect(csp).toContain(d);
	await hydrated(page);
	await expectClean(page, w, 'the landing page');
	// Control: the policy bites and the watch sees it. A string evaluated as code and an inline
	// script without the nonce are both refused, and both show up as violations and console errors.
	await page.evaluate(() => {
		setTimeout('document.documentElement.dataset.evalRan = "yes"', 0);
		const s = document.createElement('script');
		s.textContent = 'document.documentElement.dataset.inlineRan = "yes"';
		document.head.append(s);
	});
	await expect.poll(async () => (await w.violations()).length).toBeGreaterThanOrEqual(2);
	expect((await w.violations()).join('\n')).toMatch(/script-src/);
	expect(await page.evaluate(() => [document.documentElement.dataset.evalRan, document.documentElement.dataset.inlineRan])).toEqual([undefined, undefined]);
	await expect.poll(() => w.console.length).toBeGreaterThanOrEqual(2);
	await page.evaluate(() => ((window as unknown as { __csp: string[] }).__csp = []));
	w.console.length = 0;

	// Sign-in (a hydrated form posting to this origin).
	await signInInBrowser(page, demo.engineer.email, demo.engineer.password);
	await expectClean(page, w, 'sign-in');

	// The workbench: the pixi board draws, stepping moves it, and a snapshot is captured. (A click
	// once lost to the list's own refresh: circuits-list-navigation.spec.ts.)
	await page.goto(`/teams/${SLUG}/circuits`);
	await hydrated(page);
	await page.getByRole('link', { name: /fault planted/ }).click();
	await hydrated(page);
	await waitForRun(page);
	await expect(page.getByTestId('dial-board').locator('canvas')).toBeVisible();
	await page.getByTestId('step-forward').click();
	await expect(page.getByTestId('step-readout')).toHaveText(/step 1 \//);
	await page.getByTestId('step-forward').click();
	await expect(page.getByTestId('step-readout')).toHaveText(/step 2 \//);
	await page.getByRole('tab', { name: 'Share' }).click();
	await page.getByTestId('capture-frame').click();
	await expect(page.getByTestId('snapshot-preview')).toBeVisible();
	await expectClean(page, w, 'the workbench');

	// A report (opened over the API as the command line does: the server draws its board) and its page.
	const pushed = await page.request.post(`/api/teams/${SLUG}/traces`, { data: { document: faultyAdder(`CSP check ${Date.now()}`), inputs: FAULT_INPUTS } });
	expect(pushed.status(), await pushed.text()).toBe(201);
	const trace = (await pushed.json()) as { id: string };
	const opened = await page.request.post(`/api/teams/${SLUG}/reports`, { data: { traceId: trace.id, step: 13, title: 'CSP check: the report page' } });
	expect(opened.status(), await opened.text()).toBe(201);
	const report = (await opened.json()) as { id: string };
	await page.goto(`/teams/${SLUG}/reports/${report.id}`);
	await hydrated(page);
	await expect(page.getByTestId('report-title')).toHaveText('CSP check: the report page');
	// The server-drawn board (an SVG image of this origin) loads under the page's img-src.
	const board = page.getByTestId('report-board-image');
	await expect(board).toBeVisible();
	await expect.poll(() => board.evaluate((i: HTMLImageElement) => i.naturalWidth)).toBeGreaterThan(0);
	await expectClean(page, w, 'the report page');

	// The replay: recomputed in the browser's worker, stepped.
	await page.goto(`/teams/${SLUG}/traces/${trace.id}/replay?step=0`);
	await hydrated(page);
	await waitForRun(page);
	await expect(page.getByTestId('replay-match')).toBeVisible();
	await page.getByTestId('step-forward').click();
	await expect(page.getByTestId('step-readout')).toHaveText(/step 1 \//);
	await expect(page.getByTestId('dial-board').locator('canvas')).toBeVisible();
	await expectClean(page, w, 'the replay');
	await ctx.close();
});
