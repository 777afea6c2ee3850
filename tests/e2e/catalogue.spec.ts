import { expect, test } from '@playwright/test';
import { imeiCheckDigit } from '../../src/lib/domain/identifiers';
import { signIn } from './helpers';

// A symptom no flow covers goes from the catalogue, through intake, to the library's "write next" list.
test('a senior adds a symptom, a technician books a job with it, the library counts it as without a flow', async ({
	browser
}) => {
	const n = Date.now() % 1e6;
	const code = `tilt-sensor-${n}`;
	const label = `Screen does not rotate ${n}`;

	const senior = await browser.newPage();
	await signIn(senior, 'senior', '/flows');
	await senior.getByRole('link', { name: 'Symptoms' }).click();
	await expect(senior.getByRole('heading', { name: 'Symptoms', level: 1 })).toBeVisible();
	await senior.getByLabel('Code').fill(code);
	await senior.getByLabel('Label').first().fill(label);
	await senior.getByLabel('Group').first().fill('Cameras and sensors');
	await senior.getByRole('button', { name: 'Add' }).click();
	await expect(senior.getByRole('status')).toContainText(
		`“${label}” is in the catalogue under Cameras and sensors`
	);
	const row = senior.locator(`[data-testid="symptom-row"][data-code="${code}"]`);
	await expect(row).toContainText('0 jobs');
	await expect(row).toContainText('no flow yet');
	await expect(senior.getByText(`added ${code}`)).toBeVisible();
	// A row's own form: a refusal keeps the typed label beside its message; a good save says so.
	await row.getByText(`Change “${label}”`).click();
	await row.getByLabel('Label').fill('x');
	await row.getByRole('button', { name: 'Save' }).click();
	await expect(row.getByText('Write what the customer or the technician sees')).toBeVisible();
	await expect(row.getByLabel('Label')).toHaveValue('x');
	await row.getByLabel('Label').fill(label);
	await row.getByRole('button', { name: 'Save' }).click();
	await expect(senior.getByRole('status')).toContainText(`“${label}” is saved.`);
	await senior.close();

	const tech = await browser.newPage();
	await signIn(tech, 'tech', '/flows/symptoms');
	// Technicians read the catalogue but get no controls.
	await expect(tech.getByRole('button', { name: 'Add' })).toHaveCount(0);
	await expect(tech.getByText(/^Change “/)).toHaveCount(0);

	await tech.goto('/jobs/new');
	// Invented IMEI ("00" test reporting body), check digit computed.
	const body = `0066${String(n).padStart(10, '0')}`;
	await tech.getByLabel('Name', { exact: true }).fill('Sabine Corrow');
	await tech.getByLabel('Phone', { exact: true }).fill('+00 555 0163');
	await tech.getByLabel('Maker', { exact: true }).fill('Corvana');
	await tech.getByLabel('Model', { exact: true }).fill('Tern 6');
	await tech.getByLabel('IMEI', { exact: true }).fill(`${body}${imeiCheckDigit(body)}`);
	await tech.getByLabel('Liquid', { exact: true }).selectOption('fresh');
	await tech.getByLabel('Not needed').check();
	const cameras = tech.getByRole('group', { name: 'Cameras and sensors' });
	await cameras.getByRole('checkbox', { name: label }).check();
	await tech.getByRole('button', { name: 'Save the job' }).click();
	await expect(tech).toHaveURL(/\/jobs\/[0-9a-f-]{36}/);
	await expect(tech.getByText(label, { exact: true })).toBeVisible();

	await tech.goto('/flows');
	const without = tech.getByTestId('without-flow');
	await expect(without.getByRole('heading', { name: 'Symptoms without a flow' })).toBeVisible();
	const item = without.locator(`li[data-code="${code}"]`);
	await expect(item).toContainText(label);
	await expect(item).toContainText('1 job');
	await tech.close();
});
