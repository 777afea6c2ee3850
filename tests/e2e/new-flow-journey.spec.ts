import { expect, test, type Page } from '@playwright/test';
import { signIn, testImei } from './helpers';

// One phone through a flow added with the symptom catalogue, all in the browser: intake picks the
// symptom from the grouped catalogue and records the pre-repair test; the job suggests the matching
// flow; the run screen walks it to a verdict; the repair checklist; the ready gate refuses a phone
// with no after-repair test; the function test; the report shows before and after. The labels are
// quoted from flows/buttons-after-liquid.flow.yaml, the symptom seed and domain/functionTests.ts.
// Everything it reads it creates itself (its own customer, IMEI and job), so other journeys' data
// and order do not matter.

const title = (page: Page) => page.getByRole('heading', { level: 1 });
const status = (page: Page) => page.getByTestId('job-status');

test('intake with a pre-repair test → run on the buttons flow → repair → ready gate → after-repair test → report', async ({
	page
}) => {
	const customer = `Ottoline Brask ${Date.now() % 1e6}`;
	await signIn(page, 'tech', '/jobs/new');
	await page.getByLabel('Name', { exact: true }).fill(customer);
	await page.getByLabel('Phone', { exact: true }).fill('+00 555 0177');
	await page.getByLabel('Maker', { exact: true }).fill('Corvana');
	await page.getByLabel('Model', { exact: true }).fill('Tern 5');
	await page.getByLabel('IMEI', { exact: true }).fill(testImei('0079'));
	await page.getByLabel('Liquid', { exact: true }).selectOption('sugary');
	await page.getByLabel('Given by the customer').check();
	await page.getByRole('checkbox', { name: /agrees that we open the phone/ }).check();
	await page
		.getByRole('group', { name: 'Buttons and body' })
		.getByRole('checkbox', { name: 'Buttons press by themselves' })
		.check();

	// What worked when it came in: the buttons did not.
	const pre = page.locator('[data-section="pre-repair"]');
	await pre.getByRole('radiogroup', { name: 'Boot' }).getByText('Works').click();
	const buttons = pre.getByRole('radiogroup', { name: 'Buttons' });
	await buttons.getByText('Does not work').click();
	await buttons.getByLabel('Note on Buttons').fill('Volume up presses itself');
	await page.getByRole('button', { name: 'Save the job' }).click();
	await expect(page).toHaveURL(/\/jobs\/[0-9a-f-]{36}\?created=1/);
	const jobId = /\/jobs\/([0-9a-f-]{36})/.exec(page.url())![1];

	// The job's symptom suggests the buttons flow first; the run starts from the job page.
	const runs = page.locator('[data-section="runs"]');
	await expect(runs.getByLabel('Start a run')).toHaveValue('buttons-after-liquid');
	await runs.getByRole('button', { name: 'Start run' }).click();
	await expect(page).toHaveURL(/\/runs\/[0-9a-f-]{36}$/);
	await expect(page.locator('[data-ready="true"]')).toBeVisible();

	await expect(title(page)).toHaveText('What do the buttons do?');
	await expect(page.getByText(/flight mode alone may not\s+stop an emergency\s+call/)).toBeVisible();
	await page.getByRole('button', { name: /A button presses itself/ }).click();
	await expect(title(page)).toHaveText('Clean the button from outside');
	await expect(page.getByRole('note', { name: 'Caution: Isopropyl alcohol' })).toBeVisible();
	await page.getByRole('button', { name: /The fault stays/ }).click();
	await expect(title(page)).toHaveText('Open, disconnect the battery and clean the button flex');
	await expect(page.getByRole('note', { name: 'Caution: Lithium-ion battery' })).toBeVisible();
	await page.getByRole('button', { name: /Every button behaves now/ }).click();
	await expect(title(page)).toHaveText('Corrosion on the button flex, cleaned');
	await expect(page.getByText(/water\s+resistance is no\s+longer assured/)).toBeVisible();

	// Quote approved and the repair under way: moved on the job page.
	await page.goto(`/jobs/${jobId}`);
	const onJob = page.locator('section[aria-labelledby="status-heading"]');
	await onJob.getByRole('button', { name: 'Move to Awaiting approval' }).click();
	await expect(onJob.getByRole('status')).toHaveText('Moved to Awaiting approval.');
	await onJob.getByRole('button', { name: 'Move to Repairing' }).click();
	await expect(onJob.getByRole('status')).toHaveText('Moved to Repairing.');

	await page.goto(`/jobs/${jobId}/checklists`);
	const repair = page.getByRole('region', { name: 'Repair checklist' });
	for (const box of await repair.getByRole('checkbox').all()) await box.check();
	await repair.getByRole('button', { name: 'Save repair checklist' }).click();
	await expect(status(page)).toContainText('Testing');

	// The ready gate: no after-repair test recorded, no reason given → refused, nothing moved.
	await page.goto(`/jobs/${jobId}`);
	await onJob.getByRole('button', { name: 'Move to Ready to collect' }).click();
	await expect(onJob.getByRole('alert')).toContainText('no after-repair function test is recorded');
	await page.reload();
	await expect(onJob.getByRole('button', { name: 'Move to Ready to collect' })).toBeVisible(); // still testing

	// The after-repair test: every item passes, so the job becomes ready.
	await page.goto(`/jobs/${jobId}/checklists`);
	const form = page.getByRole('region', { name: 'Function test' });
	await expect(form.locator('fieldset[data-item="buttons"]').getByTestId('before')).toHaveText(
		'Before: Does not work'
	);
	for (const fieldset of await form.locator('fieldset[data-item]').all())
		await fieldset.locator('label', { hasText: /^Pass$/ }).click();
	await form.getByRole('button', { name: 'Save function test' }).click();
	await expect(form.getByRole('status')).toContainText('The job is now “Ready to collect”');

	await page.goto(`/jobs/${jobId}/report`);
	const table = page.getByTestId('report-function-test');
	const row = (key: string) => table.locator(`tr[data-function="${key}"]`);
	await expect(row('buttons').locator('[data-col="before"]')).toHaveText('Does not work');
	await expect(row('buttons').locator('[data-col="after"]')).toHaveText('Works');
	await expect(row('buttons')).toContainText('Volume up presses itself');
	await expect(row('boot').locator('[data-col="before"]')).toHaveText('Works');
	await expect(row('nfc')).toHaveCount(0); // Tern 5 declares no NFC
});
