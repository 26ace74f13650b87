import { expect, test } from '@playwright/test';
import { request as newRequest } from '@playwright/test';
import { baseURL } from '../../playwright.config';
import { formHeaders, newContext, signIn } from './support/accounts';
import { demo, signInInBrowser } from './support/demo';

test('a token made on the team page works for its team only, at its role, and stops when revoked', async ({ page }) => {
	const eng = demo.engineer;
	await signInInBrowser(page, eng.email, eng.password);
	await page.goto('/teams/halvorsen-lab/tokens');
	// An engineer may grant at most engineer.
	await expect(page.getByLabel('Role').locator('option')).toHaveText(['Engineer', 'Reviewer', 'Viewer']);
	const name = `nightly-ci-${Date.now()}`;
	await page.getByLabel('Name').fill(name);
	await page.getByLabel('Role').selectOption('engineer');
	await page.getByRole('button', { name: 'Create token' }).click();
	const secret = await page.getByTestId('new-token').inputValue();
	expect(secret).toMatch(/^orr_[a-z2-7]{32}$/);
	// Shown once: a fresh load lists it by name and last four characters only.
	await page.reload();
	await expect(page.getByTestId('new-token')).toHaveCount(0);
	const row = page.getByTestId('token-row').filter({ hasText: name });
	await expect(row).toContainText(`…${secret.slice(-4)}`);
	await expect(row).toContainText('never');
	expect(await page.content()).not.toContain(secret);

	const cli = await newRequest.newContext({ baseURL, extraHTTPHeaders: { authorization: `Bearer ${secret}` } });
	const me = await cli.get('/api/me');
	expect(me.status()).toBe(200);
	expect(await me.json()).toEqual({
		user: { id: expect.any(String), email: eng.email, name: eng.name },
		teams: [{ slug: 'halvorsen-lab', name: 'Halvorsen Phase Lab', role: 'engineer' }]
	});
	expect((await cli.get('/api/teams/halvorsen-lab/members')).status()).toBe(200);
	// Engineers may not invite; the token is no more than its role.
	const inv = await cli.post('/api/teams/halvorsen-lab/invitations', { data: { email: 'someone@elsewhere.example', role: 'viewer' } });
	expect(inv.status()).toBe(403);
	expect((await inv.json()).error.code).toBe('forbidden');
	// Tokens are bound to one team: they cannot make teams...
	expect((await cli.post('/api/teams', { data: { name: 'Token Lab' } })).status()).toBe(403);

	// ...and another team of the same person answers 404, as if it did not exist.
	const browserSession = await newContext();
	expect((await signIn(browserSession, eng.email, eng.password)).status()).toBe(303);
	const other = await browserSession.post('/api/teams', { data: { name: `Reyvik side lab ${Date.now()}` } });
	expect(other.status()).toBe(201);
	const otherSlug = (await other.json()).slug;
	expect((await browserSession.get(`/api/teams/${otherSlug}/members`)).status()).toBe(200);
	const elsewhere = await cli.get(`/api/teams/${otherSlug}/members`);
	expect(elsewhere.status()).toBe(404);
	expect((await elsewhere.json()).error.code).toBe('not_found');

	// Last-used time is recorded.
	await page.reload();
	await expect(page.getByTestId('token-row').filter({ hasText: name })).not.toContainText('never');

	// A crafted form asking for more than the creator's role is refused.
	const tooMuch = await browserSession.post('/teams/halvorsen-lab/tokens?/create', { form: { name: 'sneaky', role: 'owner' }, headers: formHeaders });
	expect(tooMuch.status()).toBe(400);
	await browserSession.dispose();

	// Revoke in the browser; the token is refused from then on.
	await page.getByTestId('token-row').filter({ hasText: name }).getByRole('button', { name: `Revoke the token ${name}` }).click();
	await expect(page.getByTestId('token-row').filter({ hasText: name })).toHaveCount(0);
	const refused = await cli.get('/api/me');
	expect(refused.status()).toBe(401);
	expect(await refused.json()).toEqual({ error: { code: 'unauthorized', message: 'This API token is not valid or has been revoked.' } });
	await cli.dispose();
});

test('API errors come as { error: { code, message } }, also for unknown routes and bad tokens', async () => {
	const anon = await newRequest.newContext({ baseURL });
	expect(await (await anon.get('/api/me')).json()).toEqual({ error: { code: 'unauthorized', message: 'Sign in first.' } });
	const unknown = await anon.get('/api/no-such-thing');
	expect(unknown.status()).toBe(404);
	expect((await unknown.json()).error.code).toBe('not_found');
	const bad = await anon.get('/api/me', { headers: { authorization: 'Bearer orr_notarealtoken' } });
	expect(bad.status()).toBe(401);
	expect((await bad.json()).error.code).toBe('unauthorized');
	const badJson = await anon.post('/api/teams', { data: 'not json', headers: { 'content-type': 'application/json' } });
	expect(badJson.status()).toBe(401);
	await anon.dispose();
});
