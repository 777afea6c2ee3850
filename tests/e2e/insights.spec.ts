import { expect, test } from '@playwright/test';
import { createJob, hydrated, signIn, startRun, testImei } from './helpers';

// The test server starts with 300 invented runs (TIDEMARK_DEMO_HISTORY in playwright.config.ts,
// written by src/lib/server/insights/demo-history.ts over the shipped flows).
const FLOW = 'no-power-after-liquid';
const FLOW_TITLE = 'No power or no boot after liquid';

test('the lead reads verdict frequencies, filters by flow and date, reads an interval and exports CSV', async ({
	page
}) => {
	await signIn(page, 'lead', '/insights');
	await expect(page.getByRole('heading', { name: 'Insights', exact: true })).toBeVisible();
	await expect(
		page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Insights' })
	).toBeVisible();
	const table = page.getByTestId('verdict-table');
	await expect(table.locator('tbody tr').first()).toBeVisible();

	await hydrated(page);
	await page.getByLabel('Flow').selectOption(FLOW);
	await expect(page).toHaveURL(new RegExp(`flow=${FLOW}`));
	await expect(table.locator('tbody tr').first()).toContainText(FLOW_TITLE);
	for (const cell of await table.locator('tbody tr td:first-child').allTextContents())
		expect(cell).toContain(FLOW_TITLE);

	// Dates from the filter, kept in the URL; the page still has rows for the last year.
	const from = new Date(Date.now() - 200 * 86_400_000).toISOString().slice(0, 10);
	await page.getByLabel('From').fill(from);
	await page.getByLabel('From').dispatchEvent('change');
	await expect(page).toHaveURL(new RegExp(`from=${from}`));
	await expect(table.locator('tbody tr').first()).toBeVisible();

	// An interval reads as "lower–upper %" and holds the share.
	const row = table.locator('tbody tr').first();
	const share = Number((await row.locator('td').nth(3).textContent())!.replace(/[^\d.]/g, ''));
	const interval = (await row.getByTestId('interval').textContent())!;
	const m = interval.match(/^([\d.]+)–([\d.]+) %$/);
	expect(m, interval).not.toBeNull();
	expect(Number(m![1])).toBeLessThanOrEqual(share + 0.5);
	expect(Number(m![2])).toBeGreaterThanOrEqual(share - 0.5);

	// Reload keeps the filters (they live in the URL).
	await page.reload();
	await hydrated(page);
	await expect(page.getByLabel('Flow')).toHaveValue(FLOW);
	await expect(page.getByLabel('From')).toHaveValue(from);

	const [download] = await Promise.all([
		page.waitForEvent('download'),
		page.getByTestId('csv-verdicts').click()
	]);
	expect(download.suggestedFilename()).toBe('tidemark-verdicts.csv');
	const csv = await (await download.createReadStream()).toArray();
	const lines = Buffer.concat(csv).toString('utf8').trim().split('\n');
	expect(lines[0]).toBe(
		'flow,version,verdict,verdict_title,count,completed_runs,share,wilson95_lower,wilson95_upper'
	);
	expect(lines.length).toBeGreaterThan(1);
	for (const line of lines.slice(1)) expect(line.startsWith(`${FLOW},`)).toBe(true);
});

test('insights are for the lead only', async ({ page }) => {
	await signIn(page, 'tech');
	await expect(
		page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Insights' })
	).toHaveCount(0);
	expect((await page.goto('/insights'))?.status()).toBe(403);
	expect((await page.request.get('/api/insights/verdicts')).status()).toBe(403);
});

test('a technician gets the past runs from the step a new run stands on', async ({ page }) => {
	await signIn(page, 'tech');
	const job = await createJob(page, { imei: testImei('0044'), symptoms: ['no-power'] });
	const runId = await startRun(page, job, FLOW);
	const res = await page.request.get(`/api/runs/${runId}/history`);
	expect(res.status()).toBe(200);
	const history = await res.json();
	expect(history.stepId).toBe('liquid-contact');
	expect(history.runs).toBeGreaterThanOrEqual(5);
	expect(history.verdicts.length).toBeGreaterThan(0);
	for (const v of history.verdicts) expect(v.lower).toBeLessThanOrEqual(v.share);

	// On the run screen itself, beside the step, marked as history rather than advice.
	await page.goto(`/runs/${runId}`);
	await expect(page.locator('[data-ready="true"]')).toBeVisible();
	const past = page.getByTestId('past-runs');
	await expect(past).toBeVisible();
	await expect(past).toContainText('Past runs from this step ended in');
	await expect(past).toContainText('History, not advice');
	await expect(past).toContainText(history.verdicts[0].verdictTitle);
	await expect(past).toContainText(`${history.verdicts[0].count}/${history.runs}`);
	if (history.suggestion) {
		const order = past.getByTestId('suggested-order');
		await expect(order).toContainText(history.suggestion.order[0].title);
		await expect(order).toContainText('check in this order');
	}
});

test('at an isolation test the technician sees which follow-up test past runs make worth checking first, and why', async ({
	page
}) => {
	// flows/restart-loop-after-liquid.flow.yaml: "Isolation test with the front sensor flex unplugged"
	// leads to two different tests (a 6-minute diode reading, a 30-minute isolation of the others).
	await signIn(page, 'tech');
	const job = await createJob(page, { imei: testImei('0045'), symptoms: ['restart-loop'] });
	const runId = await startRun(page, job, 'restart-loop-after-liquid');
	const history = await (await page.request.get(`/api/runs/${runId}/history?step=isolate-front-flex`)).json();
	expect(history.runs, 'demo history passes this step at least five times').toBeGreaterThanOrEqual(5);
	expect(history.suggestion).not.toBeNull();

	await page.goto(`/runs/${runId}`);
	await expect(page.locator('[data-ready="true"]')).toBeVisible();
	await page.keyboard.press('1'); // Restarts again and again
	await page.getByRole('button', { name: /Battery looks normal and is disconnected/ }).click();
	await page.getByRole('button', { name: /Corrosion or residue seen/ }).click();
	await expect(page.getByRole('heading', { level: 1 })).toHaveText(
		'Isolation test with the front sensor flex unplugged'
	);
	const order = page.getByTestId('past-runs').getByTestId('suggested-order');
	await expect(order).toBeVisible();
	await expect(order.getByRole('listitem').first()).toContainText(history.suggestion.order[0].title);
	await expect(order).toContainText(`Check “${history.suggestion.order[0].title}” first because`);
	await expect(order).toContainText('single-fault model');
});
