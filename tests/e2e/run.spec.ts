import { expect, test, type Page } from '@playwright/test';
import { imeiCheckDigit } from '../../src/lib/domain/identifiers';
import { signIn } from './helpers';

// Journeys through the shipped restart-loop flow (flows/restart-loop-after-liquid.flow.yaml); the
// step titles and outcome labels below are quoted from that file.
let serial = 0;
/** Invented test IMEI ("00" body, check digit computed), different for every job. */
const imei = () => {
	const body = `0033${String(Date.now() % 1e8).padStart(8, '0')}${String(++serial).padStart(2, '0')}`;
	return `${body}${imeiCheckDigit(body)}`;
};

async function createJob(page: Page, over: Record<string, unknown> = {}) {
	const res = await page.request.post('/api/jobs', {
		data: {
			customerName: 'Tove Marchbank',
			customerEmail: 'tove@example.test',
			maker: 'Corvana',
			model: 'Tern 6 Pro',
			imei: imei(),
			symptoms: ['restart-loop'],
			liquid: 'salt',
			submerged: false,
			passcodeStatus: 'given',
			consentToOpen: true,
			dataFirst: false,
			...over
		}
	});
	expect(res.status(), await res.text()).toBe(201);
	return (await res.json()) as { id: string; jobNumber: string };
}

async function startFromJob(page: Page, jobId: string) {
	await page.goto(`/jobs/${jobId}`);
	const runs = page.locator('[data-section="runs"]');
	await expect(runs.getByLabel('Start a run')).toHaveValue('restart-loop-after-liquid');
	await runs.getByRole('button', { name: 'Start run' }).click();
	await expect(page).toHaveURL(/\/runs\/[0-9a-f-]{36}$/);
	await ready(page);
}

const title = (page: Page) => page.getByRole('heading', { level: 1 });
/** The run screen is server-rendered; wait until it is hydrated before typing or clicking. */
const ready = (page: Page) => expect(page.locator('[data-ready="true"]')).toBeVisible();
const saved = (page: Page) => expect(page.getByTestId('save-state')).toHaveText('All saved');

test('a technician runs the restart-loop flow from a job, with keys, buttons, Back and a reload, to a verdict', async ({
	page
}) => {
	await signIn(page, 'tech');
	const job = await createJob(page, { dataFirst: true });
	await startFromJob(page, job.id);

	await expect(page.getByTestId('data-first')).toContainText('Data first');
	await expect(title(page)).toHaveText('What does the phone do when powered on as received?');
	await page.keyboard.press('1'); // Restarts again and again
	await expect(title(page)).toHaveText('Open the phone and disconnect the battery');
	await expect(page.getByRole('note', { name: 'Caution: Lithium-ion battery' })).toBeVisible();
	await page.getByRole('button', { name: /Battery looks normal and is disconnected/ }).click();
	await expect(title(page)).toHaveText(
		'Inspect the earpiece area and the front sensor flex under the microscope'
	);
	await saved(page);

	// A reload resumes exactly here: the server holds the state.
	await page.reload();
	await ready(page);
	await expect(title(page)).toHaveText(
		'Inspect the earpiece area and the front sensor flex under the microscope'
	);
	await expect(page.getByRole('navigation', { name: 'Path so far' })).toContainText(
		'Battery looks normal and is disconnected'
	);

	await page.getByLabel(/Notes on this step/).fill('Green deposits beside the connector');
	await page.getByRole('button', { name: /Corrosion or residue seen/ }).click();
	await page.keyboard.press('2'); // Still restarts or sits in the recovery screen
	await expect(title(page)).toHaveText('Isolation test with the other modules, one at a time');
	await page.getByRole('button', { name: 'Back to the previous step' }).click();
	await expect(title(page)).toHaveText('Isolation test with the front sensor flex unplugged');
	await page.keyboard.press('2');
	await page.keyboard.press('1'); // Boots to the lock screen with one module unplugged
	await expect(title(page)).toHaveText('A module other than the front sensor flex makes it restart');
	await expect(page.getByText('Severity: Replace a part')).toBeVisible();
	await expect(page.getByRole('region', { name: 'Repair checklist' })).toContainText(
		'Record which module it was.'
	);
	await expect(page.getByText(/User data reachable/).first()).toBeVisible();
	await saved(page);

	// The revision trail keeps the answer that Back revised.
	await page.getByText(/Answers and revisions/).click();
	await expect(page.locator('[data-superseded="true"]')).toHaveCount(1);

	await page.reload();
	await expect(page.getByText('Verdict reached')).toBeVisible();
	await expect(title(page)).toHaveText('A module other than the front sensor flex makes it restart');
	await expect(page.getByRole('link', { name: /repair and function-test checklists/ })).toBeVisible();
	await page.getByRole('link', { name: /^Job TM-\d{6}$/ }).click();
	const runs = page.locator('[data-section="runs"]');
	await expect(runs.getByText('module-fault')).toBeVisible();
	await expect(runs.locator('[data-run-status="completed"]')).toBeVisible();
});

test('a measured reading routes the run: the matching range lights up as it is typed', async ({ page }) => {
	await signIn(page, 'tech');
	const job = await createJob(page);
	await startFromJob(page, job.id);
	for (const key of ['1', '2', '1', '1']) {
		const before = await title(page).textContent();
		await page.keyboard.press(key);
		await expect(title(page)).not.toHaveText(before!);
	}
	await expect(title(page)).toHaveText('Diode-mode reading on the front sensor flex connector, board side');
	const reading = page.getByLabel(/^Reading/);
	await reading.fill('9');
	await expect(page.getByText('A reading above 3 V is not possible here.')).toBeVisible();
	await expect(page.getByRole('button', { name: /Record reading/ })).toBeDisabled();
	await reading.fill('0.4');
	await expect(page.locator('[data-lit="true"]')).toContainText('No short');
	await reading.fill('0,02');
	await expect(page.locator('[data-lit="true"]')).toContainText('Short to ground');
	await reading.press('Enter');
	await expect(title(page)).toHaveText('A front sensor line is shorted to ground on the board');
	await expect(page.getByText('Severity: Board-level repair')).toBeVisible();
	await saved(page);
	await page.reload();
	await expect(page.getByRole('navigation', { name: 'Path so far' })).toContainText('0.02 V');
});

test('a run cannot start without the customer’s consent to open the phone', async ({ page }) => {
	await signIn(page, 'tech');
	const job = await createJob(page, { consentToOpen: false });
	await page.goto(`/jobs/${job.id}`);
	const runs = page.locator('[data-section="runs"]');
	await expect(runs.getByRole('button', { name: 'Start run' })).toBeDisabled();
	await expect(runs.getByTestId('run-blocked')).toContainText('consent');
	const res = await page.request.post('/api/runs', {
		data: { jobId: job.id, flowId: 'restart-loop-after-liquid' }
	});
	expect(res.status()).toBe(409);
	expect((await res.json()).message).toMatch(/not consented to opening the phone/);
});
