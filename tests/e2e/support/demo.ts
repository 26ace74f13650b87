import { readFileSync } from 'node:fs';
import { expect, type Page } from '@playwright/test';

export type DemoAccount = { email: string; password: string; role: string; name: string };
/** The invented demo people the seeds put into "Halvorsen Phase Lab". */
export const demo: Record<string, DemoAccount> = Object.fromEntries(
	(JSON.parse(readFileSync('seeds/demo-accounts.json', 'utf8')) as DemoAccount[]).map((a) => [a.role, a])
);

export async function signInInBrowser(page: Page, email: string, password: string): Promise<void> {
	await page.goto('/signin');
	await page.waitForFunction(() => document.documentElement.dataset.hydrated === 'true');
	await page.getByLabel('E-mail').fill(email);
	await page.getByLabel('Password').fill(password);
	await page.getByRole('button', { name: 'Sign in' }).click();
	await expect(page).not.toHaveURL(/\/signin/);
}

/** Wait until the page's client code has taken over (the root layout sets data-hydrated). */
export async function hydrated(page: Page): Promise<void> {
	await page.waitForFunction(() => document.documentElement.dataset.hydrated === 'true');
}

/** Wait for the workbench's run summary, then for the debounced re-run after an edit (200 ms). */
export async function waitForRun(page: Page): Promise<void> {
	await expect(page.getByTestId('run-summary')).toBeVisible({ timeout: 30_000 });
	await page.waitForTimeout(400);
}
