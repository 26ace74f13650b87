import { expect, test } from '@playwright/test';

test('landing page uses the bundled fonts and never leaves 127.0.0.1', async ({ page }) => {
	const outside: string[] = [];
	page.on('request', (req) => {
		const url = new URL(req.url());
		if (url.protocol.startsWith('http') && url.hostname !== '127.0.0.1') outside.push(req.url());
	});
	const fontResponses: string[] = [];
	page.on('response', (res) => {
		if (/\.(woff2?|ttf)(\?|$)/.test(res.url()) && res.ok()) fontResponses.push(res.url());
	});

	await page.goto('/');
	await expect(page.getByRole('heading', { level: 1 })).toContainText('rotation');
	await page.evaluate(() => document.fonts.ready);

	const family = await page.evaluate(() => getComputedStyle(document.querySelector('h1')!).fontFamily);
	expect(family).toContain('Space Grotesk Variable');
	const loaded = await page.evaluate(() =>
		[...document.fonts].filter((f) => f.status === 'loaded').map((f) => f.family.replace(/"/g, ''))
	);
	expect(loaded).toContain('Space Grotesk Variable');
	// The monospace face (angles, registers, code) is our own bundled choice.
	const mono = await page.evaluate(() => getComputedStyle(document.querySelector('.font-mono')!).fontFamily);
	expect(mono).toMatch(/^"?JetBrains Mono Variable/);
	const monoLoaded = await page.evaluate(async () => (await document.fonts.load('16px "JetBrains Mono Variable"')).length);
	expect(monoLoaded).toBeGreaterThan(0);
	expect(fontResponses.length).toBeGreaterThan(0);
	for (const u of fontResponses) expect(new URL(u).hostname).toBe('127.0.0.1');
	expect(outside).toEqual([]);
});

test('health endpoint reports the database and the queue up', async ({ request }) => {
	const res = await request.get('/api/health');
	expect(res.status()).toBe(200);
	expect(await res.json()).toEqual({ ok: true, db: 'up', queue: 'up' });
});

test('unknown pages get our error page', async ({ page }) => {
	const res = await page.goto('/no-such-page');
	expect(res?.status()).toBe(404);
	await expect(page.getByText('Nothing lives at this address')).toBeVisible();
});

test('pages may run their own scripts but not be framed; API answers run nothing', async ({ page, request }) => {
	const res = await page.goto('/signin');
	const csp = res!.headers()['content-security-policy'];
	expect(csp).toContain("frame-ancestors 'none'");
	expect(csp).not.toContain("default-src 'none'");
	// Hydrated: the sign-in form's client-side code ran (a deny-all policy on pages once stopped it).
	await page.waitForFunction(() => document.documentElement.dataset.hydrated === 'true', undefined, { timeout: 20_000 });
	const api = await request.get('/api/health');
	expect(api.headers()['content-security-policy']).toContain("default-src 'none'");
});
