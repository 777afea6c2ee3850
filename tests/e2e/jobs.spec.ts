import { expect, test } from '@playwright/test';
import { imeiCheckDigit } from '../../src/lib/domain/identifiers';
import { signIn } from './helpers';

// An invented test IMEI: a "00" body (test reporting body, from memory) with its computed Luhn digit.
const body = '00551234567890';
const goodImei = `${body}${imeiCheckDigit(body)}`;
const badImei = `${body}${(imeiCheckDigit(body) + 3) % 10}`;

test('a technician takes in a phone, finds it in the list and moves it along', async ({ page }) => {
	const customer = `Odile Farquharson ${Date.now() % 100000}`;
	await signIn(page, 'tech', '/jobs');
	await expect(page.getByRole('heading', { name: 'Jobs', exact: true })).toBeVisible();
	await page.getByRole('link', { name: 'New job' }).click();
	await expect(page.getByRole('heading', { name: 'Take in a phone' })).toBeVisible();

	await page.getByLabel('Name', { exact: true }).fill(customer);
	await page.getByLabel('Phone', { exact: true }).fill('+44 20 7946 0123');
	await page.getByLabel('Maker', { exact: true }).fill('Corvana');
	await page.getByLabel('Model', { exact: true }).fill('Tern 6');
	await page.getByLabel('IMEI', { exact: true }).fill(badImei);
	await page.getByLabel('Liquid', { exact: true }).selectOption('salt');
	await page.getByLabel('It was submerged').check();
	await page.getByLabel('About how deep').fill('0.5');
	await page.getByLabel('About how long').fill('3');
	await page.getByLabel('Rated protection').fill('IP67');
	await page.getByRole('checkbox', { name: 'Restart loop' }).check();
	await page.getByLabel('Withheld by the customer').check();
	await page.getByLabel(/agrees that we open the phone/).check();

	// The exposure check follows the form: within IP67's depth and time, but salt is not the test liquid.
	const panel = page.getByTestId('exposure-panel');
	await expect(panel).toContainText('Outside the test conditions');
	await expect(panel).toContainText('common practice');

	await page.getByRole('button', { name: 'Save the job' }).click();
	await expect(page.getByText(/check digit \(the last digit\) does not match/)).toBeVisible();
	await expect(page).toHaveURL(/\/jobs\/new/);

	await page.getByLabel('IMEI', { exact: true }).fill(goodImei);
	await page.getByRole('button', { name: 'Save the job' }).click();
	await expect(page).toHaveURL(/\/jobs\/[0-9a-f-]{36}/);
	await expect(page.getByRole('status').filter({ hasText: /saved/ })).toBeVisible();
	await expect(page.getByTestId('job-identifier')).toHaveText(
		`${goodImei.slice(0, 8)} ${goodImei.slice(8, 14)} ${goodImei.slice(14)}`
	);

	// Back to the list: the search finds the new job by the customer's name and reflects it in the URL.
	await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Jobs' }).click();
	await page.getByLabel('Search').fill(customer);
	await expect(page).toHaveURL(/q=Odile/);
	const rows = page.getByTestId('job-row');
	await expect(rows).toHaveCount(1);
	await expect(rows.first()).toContainText('Corvana Tern 6');
	await rows.first().getByRole('link').click();

	// Only the workflow's next steps are offered; moving on writes the history.
	await expect(page.getByRole('button', { name: 'Move to Repairing' })).toHaveCount(0);
	await page.getByLabel('Note for the history').fill('Opened, corrosion at the battery connector');
	await page.getByRole('button', { name: 'Move to Diagnosing' }).click();
	await expect(page.getByRole('status').filter({ hasText: 'Moved to Diagnosing.' })).toBeVisible();
	const history = page.getByTestId('history-entry');
	await expect(history).toHaveCount(2);
	await expect(history.last()).toContainText('Received → Diagnosing');
	await expect(history.last()).toContainText('corrosion at the battery connector');
	await expect(page.getByRole('button', { name: 'Move to Awaiting approval' })).toBeVisible();
});

test('intake asks how warm and how still the water was, judges it against the IP test conditions and keeps the answers', async ({
	page
}) => {
	const customer = `Pell Drumquist ${Date.now() % 100000}`;
	const imeiBody = '00551234567891';
	await signIn(page, 'tech', '/jobs/new');
	await page.getByLabel('Name', { exact: true }).fill(customer);
	await page.getByLabel('Phone', { exact: true }).fill('+44 20 7946 0124');
	await page.getByLabel('Maker', { exact: true }).fill('Corvana');
	await page.getByLabel('Model', { exact: true }).fill('Tern 6');
	await page.getByLabel('IMEI', { exact: true }).fill(`${imeiBody}${imeiCheckDigit(imeiBody)}`);
	await page.getByLabel('Liquid', { exact: true }).selectOption('fresh');
	await page.getByLabel('It was submerged').check();
	await page.getByLabel('About how deep').fill('0.5');
	await page.getByLabel('About how long').fill('5');
	await page.getByLabel('Rated protection').fill('IP67');
	await page.getByLabel('Not needed').check();

	// Defaults (still water at room temperature): within IP67's 1 m / 30 min (IEC 60529 digit 7).
	const panel = page.getByTestId('exposure-panel');
	await expect(panel).toContainText('Within the rating');
	await expect(panel).toContainText('still fresh water near the phone’s temperature');

	// Warm water is more than 5 K warmer than the phone: outside the test conditions.
	await page.getByRole('radio', { name: /^Warm/ }).check();
	await expect(panel).toContainText('Outside the test conditions');
	await expect(panel).toContainText('warmer than the phone');
	await page.getByRole('radio', { name: /Jet or running tap/ }).check();
	await page.getByRole('checkbox', { name: /Soap or detergent/ }).check();
	await expect(panel).toContainText('moving water or a jet');
	await expect(panel).toContainText('soap or detergent');

	// IP69 is a jet test, never an immersion rating.
	await page.getByLabel('Rated protection').fill('IP69');
	await expect(panel).toContainText('Beyond the rating');
	await expect(panel).toContainText('second digit 9 is a high-pressure, high-temperature jet test');

	await page.getByRole('button', { name: 'Save the job' }).click();
	await expect(page).toHaveURL(/\/jobs\/[0-9a-f-]{36}/);
	await expect(page.getByTestId('intake-conditions')).toHaveText(
		'Warm, jet or running tap, with soap or detergent'
	);
	await expect(page.getByTestId('exposure-panel')).toContainText('no immersion rating');
});

test('the job list filters by status and sorts, keeping both in the URL', async ({ page }) => {
	await signIn(page, 'tech', '/jobs');
	await page.getByLabel('Status').selectOption('diagnosing');
	await expect(page).toHaveURL(/status=diagnosing/);
	// Wait for the filtered list itself: the URL changes before the new page of rows arrives.
	await expect(page.getByTestId('job-row').first()).toContainText('Diagnosing');
	await expect(page.getByTestId('job-row').filter({ hasNotText: 'Diagnosing' })).toHaveCount(0);
	await page.goto('/jobs?sort=customer&dir=asc');
	await expect(page.getByRole('columnheader', { name: /Customer/ })).toHaveAttribute(
		'aria-sort',
		'ascending'
	);
	const names = await page.getByTestId('job-row').locator('td:nth-child(2)').allTextContents();
	expect(names.length).toBeGreaterThan(1);
	expect(names).toEqual([...names].sort((a, b) => a.localeCompare(b, 'en', { sensitivity: 'base' })));
	await page.goto('/jobs?q=no-such-customer-anywhere');
	await expect(page.getByTestId('jobs-empty')).toContainText('No job matches these filters.');
});
