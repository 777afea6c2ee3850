import { expect, test, type Browser } from '@playwright/test';
import { dataFirstFlow } from '../../src/lib/flows/data-first-fixture';
import { signIn } from './helpers';

/**
 * A draft the lead wrote, sent for review, so the senior has one to review whatever the journeys
 * before this one did with the demo's own drafts.
 */
async function leadDraftInReview(browser: Browser) {
	const lead = await (await browser.newContext()).newPage();
	await signIn(lead, 'lead');
	const flow = dataFirstFlow(`review-me-${Date.now().toString(36)}`);
	const created = await lead.request.post('/api/flows/drafts', { data: { definition: flow } });
	expect(created.status(), await created.text()).toBe(201);
	const { id } = (await created.json()) as { id: string };
	const submitted = await lead.request.post(`/api/flows/drafts/${id}/submit`);
	expect(submitted.status(), await submitted.text()).toBe(200);
	await lead.context().close();
}

// Every role lands on Today and acts on the first item of its first lists. The test server seeds the
// demo shop's day (src/lib/server/demo/day.ts): jobs in every status, runs under way, a draft in
// review each way round, a draft sent back, a broken promise and a quote the customer sits on.

test('a technician resumes their run and takes the most urgent unassigned job', async ({ page }) => {
	await signIn(page, 'tech');
	await expect(page).toHaveURL(/\/$/);
	await expect(page.getByRole('heading', { name: /Hello, Nadia/ })).toBeVisible();

	// Resume: one tap, with the step the run stands on.
	const run = page.getByTestId('today-runs').getByTestId('today-run').first();
	await expect(run).toContainText(/At .+ · (just now|\d+ (min|h|days) ago)/);
	const step = (await run.locator('.font-medium').last().textContent())!.trim();
	await run.getByRole('link', { name: 'Resume' }).click();
	await expect(page).toHaveURL(/\/runs\/[0-9a-f-]{36}$/);
	await expect(page.getByRole('heading', { name: step })).toBeVisible();

	// The queue is in urgency order and the waiting list says what is next.
	await page.goto('/');
	await expect(page.getByTestId('today-queue').getByTestId('urgency-badge').first()).toBeVisible();
	const waiting = page.getByTestId('today-waiting');
	await expect(waiting.getByRole('link', { name: 'Function test' })).toBeVisible();
	await expect(waiting.getByRole('link', { name: /start the repair|Repair/ }).first()).toBeVisible();

	// Take the first job up for grabs: it leaves that list and joins the queue.
	const first = page.getByTestId('today-unassigned').getByTestId('today-job').first();
	const jobId = (await first.getAttribute('data-job'))!;
	await first.getByRole('button', { name: 'Take it' }).click();
	await expect(page.getByRole('status').filter({ hasText: 'The job is yours' })).toBeVisible();
	await expect(page.getByTestId('today-queue').locator(`[data-job="${jobId}"]`)).toBeVisible();
	await expect(page.getByTestId('today-unassigned').locator(`[data-job="${jobId}"]`)).toHaveCount(0);
});

test('a senior opens the draft waiting for review, never their own, and reads the note on the one sent back', async ({
	page,
	browser
}) => {
	await leadDraftInReview(browser);
	await signIn(page, 'senior');
	await expect(
		page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: /Library.*to review/ })
	).toBeVisible();
	const back = page.getByTestId('today-sent-back');
	await expect(back.locator('blockquote').first()).toContainText('how long to dry');

	const reviews = page.getByTestId('today-reviews');
	await expect(reviews).not.toContainText('By Tomas Ridley');
	await reviews.getByRole('link').first().click();
	await expect(page).toHaveURL(/\/flows\/[^/]+\/drafts\/[0-9a-f-]{36}$/);
	await expect(page.getByRole('button', { name: 'Approve and publish' })).toBeVisible();

	// The senior also has the bench lists.
	await page.goto('/');
	await expect(page.getByTestId('today-runs').getByTestId('today-run')).not.toHaveCount(0);
	const overturned = page.getByTestId('today-overturned');
	if (Number(await overturned.getAttribute('data-count')) > 0) {
		await overturned.getByRole('button', { name: 'Mark all as seen' }).click();
		await expect(overturned.getByTestId('today-empty')).toContainText('since');
	}

	// Steps whose flow health stands out: each with its reasons and a way into the editor there.
	const standouts = page.getByTestId('today-standouts');
	await expect(standouts).toBeVisible();
	if (Number(await standouts.getAttribute('data-count')) > 0)
		await expect(standouts.getByRole('link', { name: 'Edit at this step' }).first()).toHaveAttribute(
			'href',
			/\/flows\/[^/]+\/drafts\/new\?from=\d+&step=/
		);
	else await expect(standouts.getByTestId('today-empty')).toContainText('stands out');
});

test('a lead opens the first broken promise and sees the quotes to chase and the failed e-mail', async ({
	page
}) => {
	await signIn(page, 'lead');
	const overdue = page.getByTestId('today-overdue');
	await expect(overdue.getByTestId('promise').first()).toHaveAttribute('data-overdue', 'true');
	await expect(page.getByTestId('today-quotes').getByTestId('today-job')).not.toHaveCount(0);
	await expect(page.getByTestId('today-collections').getByTestId('today-job')).not.toHaveCount(0);
	await expect(
		page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: /Jobs.*overdue/ })
	).toBeVisible();

	const first = overdue.getByTestId('today-job').first();
	const number = (await first.locator('.font-mono').first().textContent())!.trim();
	await first.getByRole('link').first().click();
	await expect(page).toHaveURL(/\/jobs\/[0-9a-f-]{36}$/);
	await expect(page.getByRole('heading', { name: new RegExp(number) })).toBeVisible();
	await expect(page.getByTestId('promise')).toContainText('Overdue: promised');

	// The refused "ready to collect" e-mail fails against the local mail fake within seconds.
	await expect(async () => {
		await page.goto('/');
		await expect(page.getByTestId('today-mail').getByText(/550/).first()).toBeVisible({ timeout: 1000 });
	}).toPass({ timeout: 20_000 });
});

test('the job list sorts by urgency and filters overdue jobs', async ({ page }) => {
	await signIn(page, 'tech', '/jobs?overdue=1');
	await expect(page.getByLabel('Overdue only')).toBeChecked();
	const promises = page.getByTestId('promise');
	await expect(promises.first()).toBeVisible();
	for (const p of await promises.all()) await expect(p).toHaveAttribute('data-overdue', 'true');
	await page.goto('/jobs?sort=urgency');
	await expect(page.getByRole('columnheader', { name: /Urgency/ })).toHaveAttribute(
		'aria-sort',
		'descending'
	);
	const levels = await page
		.getByTestId('job-row')
		.getByTestId('urgency-badge')
		.evaluateAll((els) => els.map((e) => e.getAttribute('data-level')));
	const rank = { low: 0, elevated: 1, high: 2, critical: 3 } as Record<string, number>;
	const ranks = levels.map((l) => rank[l!]);
	expect(ranks.length).toBeGreaterThan(2);
	expect(ranks).toEqual([...ranks].sort((a, b) => b - a));
});
