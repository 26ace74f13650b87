import { expect, test } from '@playwright/test';
import { formHeaders, freshEmail, newContext, pathOf, signIn, signUp, waitForMail } from './support/accounts';

test('reset by e-mailed link: new password works, old one and old sessions do not, link works once', async ({ page }) => {
	const email = freshEmail('forgetful');
	const oldPassword = 'first-phase-guess-1';
	const newPassword = 'second-phase-guess-2';
	// A session elsewhere (another device), made with the old password.
	const elsewhere = await newContext();
	await signUp(elsewhere, email, 'Rasmus Ellingboe', oldPassword);
	expect((await elsewhere.get('/api/me')).status()).toBe(200);

	await page.goto('/reset');
	await page.getByLabel('E-mail').fill(email);
	await page.getByRole('button', { name: 'Send the link' }).click();
	await expect(page.getByText(`If ${email} belongs to an account, a link is on its way.`)).toBeVisible();

	const mail = await waitForMail(email, '/reset/');
	expect(mail.subject).toBe('Set a new Orrery password');
	await page.goto(pathOf(mail.link));
	await page.getByLabel('New password').fill(newPassword);
	await page.getByLabel('The same again').fill(newPassword);
	await page.getByRole('button', { name: 'Save the new password' }).click();
	await expect(page).toHaveURL(/\/teams$/);
	await expect(page.getByRole('heading', { name: 'Your teams' })).toBeVisible();

	// The other device's session ended.
	const after = await elsewhere.get('/api/me');
	expect(after.status()).toBe(401);
	await elsewhere.dispose();

	const fresh = await newContext();
	expect((await signIn(fresh, email, oldPassword)).status()).toBe(400);
	expect((await signIn(fresh, email, newPassword)).status()).toBe(303);
	await fresh.dispose();

	// Single use.
	await page.goto(pathOf(mail.link));
	await expect(page.getByText('This link has expired or has been used.').first()).toBeVisible();
	const reuse = await (await newContext()).post(pathOf(mail.link), { form: { password: 'third-phase-guess-3', confirm: 'third-phase-guess-3' }, headers: formHeaders });
	expect(reuse.status()).toBe(400);
});

test('asking for a reset for an unknown address looks the same and sends nothing', async ({ page }) => {
	const nobody = freshEmail('nobody');
	await page.goto('/reset');
	await page.getByLabel('E-mail').fill(nobody);
	await page.getByRole('button', { name: 'Send the link' }).click();
	await expect(page.getByText(`If ${nobody} belongs to an account, a link is on its way.`)).toBeVisible();
	await expect(waitForMail(nobody, '/reset/', 1500)).rejects.toThrow(/no mail/);
});
