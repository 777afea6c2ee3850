import AxeBuilder from '@axe-core/playwright';
import { expect, test, type Browser, type Page } from '@playwright/test';
import { dataFirstFlow } from '../../src/lib/flows/data-first-fixture';
import { createJob, hydrated, signIn, startRun, testImei, type accounts } from './helpers';

// Data first, end to end, on a flow of its own (src/lib/flows/data-first-fixture.ts) so the shipped
// flows can change freely: a data-first job, a run that proves the data reachable, the panel, the
// held hot-air step, "backed up" recorded, the run going on, and the job page and report saying so.
// E2E_SHOTS=<folder> also saves the panel at tablet width in both themes.
const flow = dataFirstFlow(`data-first-${Date.now().toString(36)}`);
const shots = process.env.E2E_SHOTS;

async function as(browser: Browser, who: keyof typeof accounts, width = 1280) {
	const context = await browser.newContext({ viewport: { width, height: 1100 } });
	const page = await context.newPage();
	await signIn(page, who);
	return page;
}

async function publish(browser: Browser) {
	const senior = await as(browser, 'senior');
	const created = await senior.request.post('/api/flows/drafts', { data: { definition: flow } });
	expect(created.status(), await created.text()).toBe(201);
	const { id } = (await created.json()) as { id: string };
	const submitted = await senior.request.post(`/api/flows/drafts/${id}/submit`);
	expect(submitted.status(), await submitted.text()).toBe(200);
	const lead = await as(browser, 'lead');
	const approved = await lead.request.post(`/api/flows/drafts/${id}/approve`);
	expect(approved.status(), await approved.text()).toBe(200);
	await senior.context().close();
	await lead.context().close();
}

const title = (page: Page) => page.getByRole('heading', { level: 1 });

const TAGS = ['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa', 'wcag22a', 'wcag22aa'];

/** In both themes: no WCAG A/AA violation (axe-core) where `testId` shows, and a screenshot when asked. */
async function lookAt(page: Page, name: string, testId: string) {
	for (const theme of ['light', 'dark'] as const) {
		await page.context().addCookies([{ name: 'theme', value: theme, url: page.url() }]);
		await page.reload();
		await hydrated(page);
		await expect(page.getByTestId(testId)).toBeVisible();
		const found = await new AxeBuilder({ page })
			.withTags(TAGS)
			.include(`[data-testid="${testId}"]`)
			.analyze();
		expect(
			found.violations.map((v) => `${v.id}: ${v.nodes.map((n) => n.target.join(' ')).join(', ')}`),
			`${name} (${theme})`
		).toEqual([]);
		if (shots) await page.screenshot({ path: `${shots}/${name}-${theme}.png`, fullPage: true });
	}
}

test('a data-first run asks for the data to be secured before the hot-air step; "backed up" lets it go on and the report says so', async ({
	browser
}) => {
	test.setTimeout(120_000);
	await publish(browser);
	const page = await as(browser, 'tech', 820);
	const jobId = await createJob(page, {
		customerName: 'Maren Tallis',
		customerEmail: 'maren@example.test',
		imei: testImei('0077'),
		symptoms: ['no-power'],
		dataFirst: true
	});
	await page.goto(`/runs/${await startRun(page, jobId, flow.id)}`);
	await expect(page.locator('[data-ready="true"]')).toBeVisible();
	await expect(page.getByTestId('data-secure')).toHaveCount(0);

	await page.getByRole('button', { name: /Boots to the lock screen/ }).click();
	await expect(title(page)).toHaveText('Inspect the board under the microscope');
	const panel = page.getByTestId('data-secure');
	await expect(panel.getByRole('heading', { name: 'Secure the customer’s data' })).toBeVisible();
	await expect(page.getByTestId('save-state')).toHaveText('All saved');
	await lookAt(page, 'data-secure-panel', 'data-secure');

	// The hot-air step waits: the answer is held on the screen, and the server refuses it too.
	await page.getByRole('button', { name: /Corrosion under a part/ }).click();
	await expect(page.getByTestId('data-held')).toContainText('before “Lift the corroded part with hot air”');
	await expect(title(page)).toHaveText('Inspect the board under the microscope');
	const runId = page.url().split('/').pop()!;
	const refused = await page.request.post(`/api/runs/${runId}/events`, {
		data: { type: 'ANSWER', stepId: 'inspect', outcome: 0, idempotencyKey: `held-${Date.now()}` }
	});
	expect(refused.status()).toBe(409);
	expect(await refused.json()).toMatchObject({ code: 'data-not-secured' });
	if (shots) await page.screenshot({ path: `${shots}/data-secure-held.png`, fullPage: true });

	// Keyboard: the outcomes are radio buttons, the note a text area, Enter records.
	await panel.getByLabel('Backed up').check();
	await panel.getByLabel('Note').fill('Photos and files copied to the customer’s own drive');
	await panel.getByRole('button', { name: 'Record and continue' }).click();
	await expect(panel).toHaveCount(0);
	await expect(page.getByTestId('data-secured')).toContainText('backed up');

	await page.getByRole('button', { name: /Corrosion under a part/ }).click();
	await expect(title(page)).toHaveText('Lift the corroded part with hot air');
	await page.getByRole('button', { name: /Part replaced/ }).click();
	await expect(title(page)).toHaveText('Part replaced on the board');
	await expect(page.getByTestId('save-state')).toHaveText('All saved');

	await page.goto(`/jobs/${jobId}`);
	await expect(page.getByTestId('job-data-outcome')).toContainText('Backed up');
	await expect(page.getByTestId('job-data-outcome')).toContainText('copied to the customer’s own drive');
	await lookAt(page, 'job-data-outcome', 'job-data-outcome');

	await page.goto(`/jobs/${jobId}/report`);
	const data = page.getByTestId('report-data');
	await expect(data).toHaveAttribute('data-fate', 'backed-up');
	await expect(data).toContainText('Your data was backed up');
	await lookAt(page, 'report-data', 'report-data');
	await expect(
		page.getByText(/water resistance is no longer assured unless new adhesive and seals/i).first()
	).toBeVisible();
});
