import { expect, test, type Browser, type Page } from '@playwright/test';
import sharp from 'sharp';
import { createJob, signIn, startRun } from './helpers';

// The run screen through a dropped connection (issue 15), on the shipped restart-loop flow
// (flows/restart-loop-after-liquid.flow.yaml; titles and labels quoted from it). The service
// worker runs only in the built app, which these journeys use. OFFLINE_SHOTS=<folder> also saves
// screenshots of each state as a tablet shows it (820 × 1180), in both themes.
test.use({ viewport: { width: 820, height: 1180 } });

const flow = 'restart-loop-after-liquid';
const title = (page: Page) => page.getByRole('heading', { level: 1 });
const ready = (page: Page) => expect(page.locator('[data-ready="true"]')).toBeVisible();
const saveState = (page: Page) => page.getByTestId('save-state');

async function shot(page: Page, name: string) {
	const dir = process.env.OFFLINE_SHOTS;
	if (!dir) return;
	// As the theme toggle does: a class on <html> (a modal dialog may cover the toggle itself).
	const theme = (dark: boolean) =>
		page.evaluate((d) => {
			document.documentElement.classList.toggle('dark', d);
			document.documentElement.classList.toggle('light', !d);
		}, dark);
	await page.evaluate(() => scrollTo(0, 0));
	await theme(false);
	await page.screenshot({ path: `${dir}/${name}-light.png`, fullPage: false });
	await theme(true);
	await page.screenshot({ path: `${dir}/${name}-dark.png`, fullPage: false });
	await theme(false);
}

/** Opens the run page online and waits until this device keeps it for offline use. */
async function openKept(page: Page, runId: string) {
	await page.goto(`/runs/${runId}`);
	await ready(page);
	await page.waitForFunction(
		async (path) => !!navigator.serviceWorker.controller && !!(await caches.match(path)),
		`/runs/${runId}`
	);
}

async function photo() {
	return sharp({ create: { width: 640, height: 480, channels: 3, background: '#2f8075' } })
		.jpeg()
		.toBuffer();
}

type Run = {
	currentStep: string;
	status: string;
	steps: { seq: number; stepId: string; answer: Record<string, unknown>; notes: string }[];
};
const runOf = async (page: Page, id: string) =>
	(await (await page.request.get(`/api/runs/${id}`)).json()) as Run;

test('a run goes on without a connection, survives a reload, and is stored in order, each entry once', async ({
	page,
	context
}) => {
	await signIn(page, 'tech');
	const jobId = await createJob(page, { symptoms: ['restart-loop'] });
	const runId = await startRun(page, jobId, flow);
	await openKept(page, runId);
	await expect(saveState(page)).toHaveText('All saved');

	await context.setOffline(true);
	await expect(page.getByTestId('connection')).toHaveText('Offline');
	await page.keyboard.press('1'); // Restarts again and again
	await expect(title(page)).toHaveText('Open the phone and disconnect the battery');
	await page.keyboard.press('2'); // Battery looks normal and is disconnected
	await page.getByLabel(/Notes on this step/).fill('Green deposits beside the connector');
	await page.getByRole('button', { name: /Corrosion or residue seen/ }).click();
	await page.keyboard.press('1'); // Boots to the lock screen and stays up
	await expect(title(page)).toHaveText('Diode-mode reading on the front sensor flex connector, board side');
	await page.getByLabel(/^Reading/).fill('0.02');
	await page.getByLabel(/^Reading/).press('Enter');
	await expect(title(page)).toHaveText('A front sensor line is shorted to ground on the board');
	await expect(saveState(page)).toHaveText('5 answers waiting to send');

	const photos = page.locator('[data-section="step-photos"]');
	await photos.getByTestId('photo-file-input').setInputFiles({
		name: 'front-connector.jpg',
		mimeType: 'image/jpeg',
		buffer: await photo()
	});
	await expect(photos.getByTestId('photo-waiting')).toHaveCount(1);
	await expect(page.getByTestId('photos-waiting')).toHaveText('1 photo waiting to upload');
	await shot(page, 'offline-waiting');

	// A reload without a connection: the kept page, then this device's answers on top of it.
	const reloaded = await page.reload();
	expect(reloaded?.fromServiceWorker()).toBe(true);
	await ready(page);
	await expect(title(page)).toHaveText('A front sensor line is shorted to ground on the board');
	await expect(page.getByTestId('connection')).toHaveText('Offline');
	await expect(saveState(page)).toHaveText('5 answers waiting to send');
	await expect(page.getByRole('navigation', { name: 'Path so far' })).toContainText('0.02 V');
	await expect(page.locator('[data-section="step-photos"]').getByTestId('photo-waiting')).toHaveCount(1);
	// Nothing reached the server yet (this request goes from the test, not the offline browser).
	expect((await runOf(page, runId)).steps).toEqual([]);

	await context.setOffline(false);
	await expect(saveState(page)).toHaveText('All saved', { timeout: 20_000 });
	await expect(page.getByTestId('connection')).toHaveText('Online');
	await shot(page, 'online-all-saved');

	const run = await runOf(page, runId);
	expect(run.status).toBe('completed');
	expect(run.steps.map((s) => [s.seq, s.stepId, s.answer])).toEqual([
		[1, 'power-on-as-received', { outcome: { index: 0, label: 'Restarts again and again' } }],
		[2, 'open-and-disconnect', { outcome: { index: 1, label: 'Battery looks normal and is disconnected' } }],
		[3, 'inspect-front-area', { outcome: { index: 0, label: 'Corrosion or residue seen and photographed' } }],
		[4, 'isolate-front-flex', { outcome: { index: 0, label: 'Boots to the lock screen and stays up' } }],
		[5, 'front-connector-diode', { value: 0.02, unit: 'V', range: { index: 0, label: 'Short to ground' } }]
	]);
	expect(run.steps[2].notes).toBe('Green deposits beside the connector');
	const stored = (await (await page.request.get(`/api/runs/${runId}/photos`)).json()) as {
		photos: { stepId: string; width: number }[];
	};
	expect(stored.photos.map((p) => [p.stepId, p.width])).toEqual([['front-line-short', 640]]);
	await expect(page.locator('[data-section="step-photos"]').getByTestId('photo-tile')).toHaveCount(1);
});

async function secondTablet(browser: Browser, baseURL: string) {
	const context = await browser.newContext({ baseURL });
	const page = await context.newPage();
	await signIn(page, 'senior');
	return { context, page };
}

test('answers refused because the run moved on elsewhere are held: redo one, discard the other', async ({
	page,
	context,
	browser,
	baseURL
}) => {
	await signIn(page, 'tech');
	const jobId = await createJob(page, { symptoms: ['restart-loop'] });
	const runId = await startRun(page, jobId, flow);
	await openKept(page, runId);

	await context.setOffline(true);
	await page.keyboard.press('2'); // Sits in the recovery screen
	await expect(title(page)).toHaveText('Open the phone and disconnect the battery');
	await page.keyboard.press('2'); // Battery looks normal and is disconnected
	await expect(saveState(page)).toHaveText('2 answers waiting to send');

	// Meanwhile another tablet answers the first step differently.
	const other = await secondTablet(browser, baseURL!);
	const moved = await other.page.request.post(`/api/runs/${runId}/events`, {
		data: { type: 'ANSWER', stepId: 'power-on-as-received', outcome: 0, idempotencyKey: `other-${runId}` }
	});
	expect(moved.status()).toBe(200);

	await context.setOffline(false);
	const held = page.getByTestId('held-entry');
	await expect(held).toHaveCount(2, { timeout: 20_000 });
	await expect(saveState(page)).toHaveText('2 entries not saved — choose below');
	// The screen shows where the server stands: the other tablet's answer moved it to step 2.
	await expect(title(page)).toHaveText('Open the phone and disconnect the battery');
	await expect(held.first()).toContainText('Answer “Sits in the recovery screen”');
	await expect(held.first().getByRole('button', { name: 'Redo' })).toBeDisabled();
	await expect(held.last()).toContainText('Answer “Battery looks normal and is disconnected”');
	await shot(page, 'conflict');

	await held.last().getByRole('button', { name: 'Redo' }).click();
	await expect(title(page)).toHaveText(
		'Inspect the earpiece area and the front sensor flex under the microscope'
	);
	await held.first().getByRole('button', { name: 'Discard' }).click();
	await expect(held).toHaveCount(0);
	await expect(saveState(page)).toHaveText('All saved');

	const run = await runOf(other.page, runId);
	expect(run.steps.map((s) => [s.stepId, s.answer])).toEqual([
		['power-on-as-received', { outcome: { index: 0, label: 'Restarts again and again' } }],
		['open-and-disconnect', { outcome: { index: 1, label: 'Battery looks normal and is disconnected' } }]
	]);
	await other.context.close();
});

test('a second tab on the same run sees the first one’s answers; signing out with unsent ones asks first', async ({
	page,
	context
}) => {
	await signIn(page, 'tech');
	const jobId = await createJob(page, { symptoms: ['restart-loop'] });
	const runId = await startRun(page, jobId, flow);
	await openKept(page, runId);
	const second = await context.newPage();
	await second.goto(`/runs/${runId}`);
	await ready(second);

	await context.setOffline(true);
	await page.keyboard.press('1');
	await expect(title(page)).toHaveText('Open the phone and disconnect the battery');
	await expect(title(second)).toHaveText('Open the phone and disconnect the battery');
	await expect(saveState(second)).toHaveText('1 answer waiting to send');

	await page.getByRole('button', { name: 'Sign out' }).click();
	const dialog = page.getByTestId('signout-unsent');
	await expect(dialog).toBeVisible();
	await expect(dialog).toContainText('1 answer you entered on this device is still waiting to be sent');
	await shot(page, 'signout-unsent');
	await dialog.getByRole('button', { name: 'Stay signed in' }).click();
	await expect(dialog).toBeHidden();

	await context.setOffline(false);
	await expect(saveState(page)).toHaveText('All saved', { timeout: 20_000 });
	await expect(saveState(second)).toHaveText('All saved');
	const run = await runOf(page, runId);
	expect(run.steps.map((s) => s.stepId)).toEqual(['power-on-as-received']);
	await second.close();
});
