import { AxeBuilder } from '@axe-core/playwright';
import { expect, test, type Page } from '@playwright/test';
import { demo, hydrated, signInInBrowser, waitForRun } from './support/demo';
import { FAULT_INPUTS, faultyAdder } from './support/review';

// Issue 17: every signed-in page fits 1280, 1440 and 1920 px and a 390 px phone without sideways
// scrolling; the dial board is the largest thing on the workbench (at least half of a 1440×900
// viewport); no page has a serious or critical accessibility violation (axe-core's own rules).
// Screenshots of each page at each width go to tests/artifacts for people to look at.

const SLUG = 'halvorsen-lab';
const WIDTHS = [
	{ width: 1280, height: 800 },
	{ width: 1440, height: 900 },
	{ width: 1920, height: 1080 },
	{ width: 2560, height: 1440 },
	{ width: 390, height: 844 }
];

/** The signed-in pages, found by following links as a person would (report and replay included). */
async function signedInPages(page: Page): Promise<{ name: string; path: string }[]> {
	const pages = [
		{ name: 'teams', path: '/teams' },
		{ name: 'team', path: `/teams/${SLUG}` },
		{ name: 'circuits', path: `/teams/${SLUG}/circuits` },
		{ name: 'traces', path: `/teams/${SLUG}/traces` },
		{ name: 'reports', path: `/teams/${SLUG}/reports` },
		{ name: 'members', path: `/teams/${SLUG}/members` },
		{ name: 'tokens', path: `/teams/${SLUG}/tokens` },
		{ name: 'account', path: '/account' }
	];
	await page.goto(`/teams/${SLUG}/circuits`);
	const circuit = await page.getByRole('link', { name: /fault planted/ }).first().getAttribute('href');
	pages.push({ name: 'workbench', path: circuit! });
	// A trace and a report of our own, so the replay and the report page are there to measure.
	const pushed = await page.request.post(`/api/teams/${SLUG}/traces`, { data: { document: faultyAdder(`Layout check ${Date.now()}`), inputs: FAULT_INPUTS } });
	expect(pushed.status(), await pushed.text()).toBe(201);
	const trace = (await pushed.json()) as { id: string };
	const made = await page.request.post(`/api/teams/${SLUG}/reports`, { data: { traceId: trace.id, step: 13, title: 'Layout check: the rotation c·a[1] → b[3] is halved' } });
	expect(made.status(), await made.text()).toBe(201);
	const report = (await made.json()) as { id: string };
	pages.push({ name: 'report', path: `/teams/${SLUG}/reports/${report.id}` });
	pages.push({ name: 'replay', path: `/teams/${SLUG}/traces/${trace.id}/replay?step=13` });
	return pages;
}

async function settle(page: Page, name: string) {
	await hydrated(page);
	if (name === 'workbench' || name === 'replay') await expect(page.getByTestId('run-summary')).toBeVisible({ timeout: 30_000 });
	await page.waitForTimeout(300);
}

/** The innermost elements that reach past the right edge (what to fix when a page scrolls sideways). */
async function sticking(page: Page): Promise<string[]> {
	return page.evaluate(() => {
		const edge = document.documentElement.clientWidth + 1;
		const out = [...document.body.querySelectorAll<HTMLElement>('*')].filter((el) => {
			const r = el.getBoundingClientRect();
			if (r.right <= edge || r.width === 0) return false;
			// Inside a box that scrolls sideways it cannot widen the page, unless it is placed absolutely.
			if (getComputedStyle(el).position !== 'absolute') for (let p = el.parentElement; p; p = p.parentElement) if (getComputedStyle(p).overflowX !== 'visible' && p !== document.body) return false;
			return ![...el.children].some((c) => c.getBoundingClientRect().right > edge);
		});
		return out.slice(0, 5).map((el) => `${el.tagName.toLowerCase()}${el.id ? '#' + el.id : ''}.${[...el.classList].slice(0, 4).join('.')} → ${Math.round(el.getBoundingClientRect().right)} px`);
	});
}

for (const size of WIDTHS) {
	// As the owner: the members and token pages then carry every control (invite, role choices).
	test(`no signed-in page scrolls sideways at ${size.width} px (screenshots kept)`, async ({ page }) => {
		test.setTimeout(400_000);
		await signInInBrowser(page, demo.owner.email, demo.owner.password);
		const pages = await signedInPages(page);
		await page.setViewportSize(size);
		const overflow: string[] = [];
		for (const p of pages) {
			await page.goto(p.path);
			await settle(page, p.name);
			const { scroll, client } = await page.evaluate(() => ({ scroll: document.documentElement.scrollWidth, client: document.documentElement.clientWidth }));
			if (scroll > client) overflow.push(`${p.name} at ${size.width}: ${scroll} px wide in ${client}: ${(await sticking(page)).join('; ')}`);
			await page.screenshot({ path: `tests/artifacts/layout-${p.name}-${size.width}.png` });
		}
		expect(overflow).toEqual([]);
	});
}

test('the dial board fills at least half of a 1440×900 screen and stays in view while stepping', async ({ page }) => {
	test.setTimeout(90_000);
	await signInInBrowser(page, demo.engineer.email, demo.engineer.password);
	await page.setViewportSize({ width: 1440, height: 900 });
	await openPlantedFault(page);
	const visibleArea = async () =>
		page.getByTestId('dial-board').evaluate((el) => {
			const r = el.getBoundingClientRect();
			const w = Math.max(0, Math.min(r.right, innerWidth) - Math.max(r.left, 0));
			const h = Math.max(0, Math.min(r.bottom, innerHeight) - Math.max(r.top, 0));
			return w * h;
		});
	expect(await visibleArea()).toBeGreaterThanOrEqual(0.5 * 1440 * 900);
	for (let i = 0; i < 5; i++) await page.getByTestId('step-forward').click();
	await expect(page.getByTestId('step-readout')).toHaveText(/step 5 \//);
	expect(await visibleArea()).toBeGreaterThanOrEqual(0.5 * 1440 * 900);
	await page.screenshot({ path: 'tests/artifacts/workbench-board-1440.png' });
});

/** The planted-fault demo (the seeds' hand-written controlled adder) open in the workbench, its run shown. */
async function openPlantedFault(page: Page) {
	await page.goto(`/teams/${SLUG}/circuits`);
	await page.getByRole('link', { name: /fault planted/ }).first().click();
	await settle(page, 'workbench');
}

/** The planted-fault demo at its divergence (c = 1, a = 2), the diverging dial selected. */
async function atDivergence(page: Page) {
	await openPlantedFault(page);
	for (const [r, v] of [['c', '1'], ['a', '2']]) {
		await page.locator(`#in-${r}`).fill(v);
		await page.locator(`#in-${r}`).press('Tab');
	}
	await waitForRun(page);
	await page.getByTestId('to-divergence').click();
	await expect(page.getByTestId('position')).toContainText('→ b[3]');
}

test('screenshots for people to look at: mid-step at a divergence at 1440×900 and 2560×1440', async ({ page }) => {
	test.setTimeout(120_000);
	await signInInBrowser(page, demo.engineer.email, demo.engineer.password);
	for (const size of [{ width: 1440, height: 900 }, { width: 2560, height: 1440 }]) {
		await page.setViewportSize(size);
		await atDivergence(page);
		await page.getByTestId('zoom-divergence').click();
		await page.waitForTimeout(400);
		// Stepping moves neither the page nor the board: it stays where it was.
		const top = await page.getByTestId('dial-board').evaluate((el) => el.getBoundingClientRect().top);
		await page.getByTestId('step-forward').click();
		await page.getByTestId('step-back').click();
		expect(await page.getByTestId('dial-board').evaluate((el) => el.getBoundingClientRect().top)).toBe(top);
		expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(size.width);
		await page.screenshot({ path: `tests/artifacts/workbench-divergence-${size.width}.png` });
	}
});

test('on a phone the workbench is a readable read-only view that says editing needs a wider screen', async ({ page }) => {
	test.setTimeout(90_000);
	await signInInBrowser(page, demo.engineer.email, demo.engineer.password);
	await page.setViewportSize({ width: 390, height: 844 });
	await openPlantedFault(page);
	await expect(page.getByText(/Editing needs a wider screen/)).toBeVisible();
	await expect(page.getByTestId('dial-board')).toBeVisible();
	await page.getByTestId('step-forward').click();
	await expect(page.getByTestId('step-readout')).toHaveText(/step 1 \//);
	await expect(page.getByTestId('parts-shelf')).toBeHidden();
	// The dials are readable on a phone: the board fills the width and draws each dial at least
	// 64 px across (it drew about 45 before), with no sideways scroll.
	const board = page.getByTestId('dial-board');
	expect((await board.boundingBox())!.width).toBeGreaterThanOrEqual(390 - 32);
	await expect.poll(async () => Number(await board.getAttribute('data-dial-px'))).toBeGreaterThanOrEqual(64);
	expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390);
	// The selected dial's values are written beside the board in page text.
	await expect(page.getByTestId('dial-readout')).toHaveText(/Tap a dial/);
	await page.getByRole('tab', { name: 'Table' }).click();
	await page.getByTestId('qubit-table').getByRole('button', { name: 'b[3]' }).click();
	await page.getByRole('tab', { name: 'Dials' }).click();
	await expect(page.getByTestId('dial-readout')).toContainText('selected b[3]');
	await expect.poll(async () => Number(await board.getAttribute('data-dial-px'))).toBeGreaterThanOrEqual(64);
	await page.screenshot({ path: 'tests/artifacts/workbench-phone-390.png', fullPage: true });
	await board.screenshot({ path: 'tests/artifacts/workbench-phone-dials-390.png' });
});

// axe-core's own rules (WCAG 2 A/AA and best practice); serious and critical findings fail, each
// named with its page, rule and the first nodes.
test('no page has a serious or critical accessibility violation (axe-core)', async ({ page }) => {
	test.setTimeout(300_000);
	const found: string[] = [];
	const audit = async (name: string) => {
		const result = await new AxeBuilder({ page }).analyze();
		for (const v of result.violations)
			if (v.impact === 'serious' || v.impact === 'critical') found.push(`${name}: ${v.id} (${v.impact}) ${v.nodes.slice(0, 3).map((n) => n.target.join(' ')).join(' | ')}`);
	};
	for (const path of ['/', '/signin', '/signup', '/reset']) {
		await page.goto(path);
		await hydrated(page);
		await audit(path);
	}
	await signInInBrowser(page, demo.engineer.email, demo.engineer.password);
	for (const p of await signedInPages(page)) {
		await page.goto(p.path);
		await settle(page, p.name);
		await audit(p.name);
	}
	expect(found).toEqual([]);
});

test('a skip link leads past the header to the page, and the header menus close each other', async ({ page }) => {
	await signInInBrowser(page, demo.engineer.email, demo.engineer.password);
	await page.goto(`/teams/${SLUG}/circuits`);
	await hydrated(page);
	await page.keyboard.press('Tab');
	const skip = page.getByRole('link', { name: 'Skip to the page' });
	await expect(skip).toBeFocused();
	await page.keyboard.press('Enter');
	await expect(page.locator('#main')).toBeFocused();
	// Two header menus: opening one closes the other.
	await page.getByRole('button', { name: /^Team/ }).click();
	await page.getByRole('button', { name: demo.engineer.name }).click();
	await expect(page.locator('header [role=menu], header [data-menu-open=true]')).toHaveCount(1);
});
