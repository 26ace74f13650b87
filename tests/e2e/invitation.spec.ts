import { expect, test } from '@playwright/test';
import { formHeaders, freshEmail, pathOf, waitForMail } from './support/accounts';
import { demo, signInInBrowser } from './support/demo';

test('an owner invites by e-mail; a new person signs up through the link and sees the team', async ({ page, browser }) => {
	await signInInBrowser(page, demo.owner.email, demo.owner.password);
	// The demo owner is in exactly one team, so sign-in lands on it.
	await expect(page).toHaveURL(/\/teams\/halvorsen-lab$/);
	await page.getByRole('navigation', { name: 'Team sections' }).getByRole('link', { name: 'Members' }).click();

	const invitee = freshEmail('newcomer');
	await page.getByLabel('Their e-mail').fill(invitee);
	await page.getByLabel('Their role').selectOption('reviewer');
	await page.getByRole('button', { name: 'Send invitation' }).click();
	await expect(page.getByText(`Invitation sent to ${invitee}.`)).toBeVisible();
	await expect(page.getByTestId('invitation').filter({ hasText: invitee })).toBeVisible();

	const mail = await waitForMail(invitee, '/invite/');
	expect(mail.subject).toBe('Join Halvorsen Phase Lab on Orrery');
	expect(mail.text).toContain('as reviewer');
	expect(mail.html).toContain(mail.link);

	const newcomer = await browser.newContext();
	const p2 = await newcomer.newPage();
	await p2.goto(pathOf(mail.link));
	await expect(p2.getByRole('heading', { name: 'Join Halvorsen Phase Lab' })).toBeVisible();
	await expect(p2.getByLabel('E-mail')).toHaveValue(invitee);
	await p2.getByLabel('Your name').fill('Noor Castellan');
	await p2.getByLabel('Password').fill('fourier-carry-chain-7');
	await p2.getByRole('button', { name: 'Create account and join' }).click();

	await expect(p2).toHaveURL(/\/teams\/halvorsen-lab$/);
	await expect(p2.getByRole('heading', { level: 1, name: 'Halvorsen Phase Lab' })).toBeVisible();
	await expect(p2.getByText('Your role:')).toContainText('Reviewer');

	// Used once: the same link now refuses.
	await p2.goto(pathOf(mail.link));
	await expect(p2.getByText('This invitation has already been used.')).toBeVisible();
	await newcomer.close();

	// The owner sees the new member and no longer a pending invitation.
	await page.reload();
	await expect(page.getByTestId('member-row').filter({ hasText: invitee })).toBeVisible();
	await expect(page.getByTestId('invitation').filter({ hasText: invitee })).toHaveCount(0);
});

test('a form that fails keeps what was typed and says what is wrong, per field', async ({ page }) => {
	await page.goto('/signup');
	await page.getByLabel('Your name').fill('Quill Ardent');
	await page.getByLabel('E-mail').fill('not-an-address');
	await page.getByLabel('Password').fill('short');
	// Skip the browser's own checks to see the server's answer.
	await page.locator('form').evaluate((f) => f.setAttribute('novalidate', ''));
	await page.getByRole('button', { name: 'Create account' }).click();
	await expect(page.getByLabel('E-mail')).toHaveValue('not-an-address');
	await expect(page.getByLabel('Your name')).toHaveValue('Quill Ardent');
	await expect(page.getByLabel('Password')).toHaveValue('');
	await expect(page.getByLabel('E-mail')).toHaveAccessibleDescription('That does not look like an e-mail address.');
	await expect(page.getByLabel('Password')).toHaveAccessibleDescription(/Use at least 10 characters/);
});

test('a failed form post never sends the password back', async ({ request }) => {
	const res = await request.post('/signup', {
		form: { name: 'Quill Ardent', email: 'not-an-address', password: 'short-secret-x' },
		headers: formHeaders
	});
	expect(res.status()).toBe(400);
	const body = await res.text();
	expect(body).toContain('not-an-address');
	expect(body).not.toContain('short-secret-x');
});
