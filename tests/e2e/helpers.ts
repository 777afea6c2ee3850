import { expect, type Page } from '@playwright/test';

// The demo accounts seeded by the test server (TIDEMARK_DEMO=1, DEMO_PASSWORD in playwright.config.ts).
export const password = 'e2e-demo-password';
export const accounts = {
	lead: 'lead@tidemark.test',
	senior: 'senior@tidemark.test',
	tech: 'tech@tidemark.test'
} as const;

export async function signIn(page: Page, who: keyof typeof accounts, next = '/') {
	await page.goto(`/signin?next=${encodeURIComponent(next)}`);
	await page.getByLabel('E-mail').fill(accounts[who]);
	await page.getByLabel('Password').fill(password);
	await page.getByRole('button', { name: 'Sign in' }).click();
	await expect(page).not.toHaveURL(/\/signin/);
	await hydrated(page);
}

/** Waits until the page is hydrated (the root layout marks <html data-hydrated>). */
export async function hydrated(page: Page) {
	await expect(page.locator('html[data-hydrated="true"]')).toHaveCount(1);
}
