import { expect, test } from '@playwright/test';
import { hydrated, signIn } from './helpers';

// The test server starts with 300 invented runs (TIDEMARK_DEMO_HISTORY in playwright.config.ts);
// in that history readings are re-taken often (demo-history.ts), so a measure step stands out.
const FLOW = 'no-power-after-liquid';

test('a senior opens flow health from the library, reads why a step stands out and edits the flow at that step', async ({
	page
}) => {
	await signIn(page, 'senior', `/flows/${FLOW}`);
	await page.getByTestId('flow-health-link').click();
	await expect(page).toHaveURL(new RegExp(`/flows/${FLOW}/health$`));
	await expect(page.getByRole('heading', { name: 'Flow health' })).toBeVisible();
	const table = page.getByTestId('health-table');
	// The history fills in the background at start-up; reload until this version has runs.
	await expect(async () => {
		await page.reload();
		await expect(table.locator('[data-flagged="true"]').first()).toBeVisible({ timeout: 2_000 });
	}).toPass({ timeout: 30_000 });
	await hydrated(page);

	const row = table.locator('[data-flagged="true"]').first();
	const flag = row.getByTestId('flag');
	await expect(flag).toContainText('Stands out');
	await expect(flag.locator('li').first()).toHaveText(/\d+ ?(of|\/) ?\d+/);
	const stepId = (await row.getAttribute('id'))!.replace(/^step-/, '');
	const title = (await row.locator('th a').first().textContent())!.trim();

	await row.getByTestId('edit-step').click();
	await expect(page).toHaveURL(new RegExp(`/flows/${FLOW}/drafts/new\\?from=\\d+&step=${stepId}$`));
	await hydrated(page);
	await page.getByRole('button', { name: /Start a draft from version/ }).click();
	await expect(page).toHaveURL(new RegExp(`/flows/${FLOW}/drafts/[0-9a-f-]{36}\\?step=${stepId}$`));
	await hydrated(page);
	// The editor opens with that step selected.
	await expect(page.locator('[aria-current="true"]').filter({ hasText: title })).toBeVisible();
});

test('a technician is refused flow health', async ({ page }) => {
	await signIn(page, 'tech');
	const res = await page.goto(`/flows/${FLOW}/health`);
	expect(res?.status()).toBe(403);
	await expect(page.getByText('This needs the senior role')).toBeVisible();
});
