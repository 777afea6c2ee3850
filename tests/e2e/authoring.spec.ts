import { expect, test, type Browser, type Page } from '@playwright/test';
import { createJob, hydrated, signIn, startRun, testImei, type accounts } from './helpers';

// A senior changes a shipped flow in the browser and the lead reviews it; step ids, titles and
// answer labels are quoted from flows/no-sound-after-liquid.flow.yaml. The demo seeds one senior,
// so the lead is the second pair of eyes ("another senior or a lead").
const FLOW = 'no-sound-after-liquid';
const OLD_TITLE = 'Rule out settings, then name the fault';
const NEW_TITLE = 'Rule out the settings first, then name the fault';

async function as(browser: Browser, who: keyof typeof accounts, next = '/') {
	const page = await (await browser.newContext()).newPage();
	await signIn(page, who, next);
	return page;
}

/** A job and a run of the flow's current version, started through the API as the technician. */
async function startNoSoundRun(tech: Page) {
	const job = await createJob(tech, {
		customerName: 'Ysolde Brack',
		customerEmail: 'ysolde@example.test',
		model: 'Tern 6',
		imei: testImei('0055'),
		symptoms: ['no-sound']
	});
	return startRun(tech, job, FLOW);
}

const ready = (page: Page) => expect(page.locator('[data-ready="true"]')).toBeVisible();

test('a senior drafts, breaks and fixes a flow, the lead approves it, new runs use it and old runs finish on theirs', async ({
	browser
}) => {
	test.setTimeout(180_000);
	const tech = await as(browser, 'tech');
	const earlier = await startNoSoundRun(tech);

	// The senior starts a draft from the published version, from the flow's page.
	const senior = await as(browser, 'senior', `/flows/${FLOW}`);
	await senior.getByRole('link', { name: 'Edit as a new draft' }).click();
	await senior.getByRole('button', { name: /Start a draft from version 1/ }).click();
	await expect(senior).toHaveURL(new RegExp(`/flows/${FLOW}/drafts/[0-9a-f-]{36}$`));
	const draftUrl = new URL(senior.url()).pathname;
	const draftId = draftUrl.split('/').pop()!;
	const form = senior.locator('[data-step-form="audio-basics"]');
	await expect(form).toBeVisible();
	// The form is server-rendered: type again until the hydrated editor takes it.
	await expect(async () => {
		await form.getByLabel('Title', { exact: true }).fill(NEW_TITLE);
		await expect(form.getByRole('heading', { name: NEW_TITLE })).toBeVisible({ timeout: 1000 });
	}).toPass();

	// A dangling next, typed in the YAML view.
	await senior.getByRole('tab', { name: 'YAML' }).click();
	const yaml = senior.getByLabel('Flow as YAML');
	const text = await yaml.inputValue();
	expect(text).toContain(NEW_TITLE);
	await yaml.fill(text.replace('next: speaker-mesh', 'next: speaker-mesh-typo'));
	await senior.getByRole('button', { name: 'Apply to the draft' }).click();

	// The problem shows on the step (its answer row and the step list) and in the list.
	await senior.getByRole('tab', { name: 'Form' }).click();
	const next = form.getByLabel('Answer 2: next step');
	await expect(next).toHaveValue('speaker-mesh-typo');
	await expect(next).toHaveAttribute('aria-invalid', 'true');
	await expect(form.locator('[data-problem="unknown-target"]')).toContainText('speaker-mesh-typo');
	await expect(senior.locator('[data-problem-list] [data-problem="unknown-target"]')).toBeVisible();
	await expect(senior.getByRole('button', { name: 'Submit for review' })).toBeDisabled();

	// ...and in the graph: the step is marked, the missing target is a node of its own.
	await senior.getByRole('tab', { name: 'Graph' }).click();
	const graph = senior.locator('[data-flow-graph]');
	await expect(graph.locator('[data-node="audio-basics"]')).toContainText('1 problem');
	await expect(graph.locator('[data-kind="missing"]')).toContainText('No step "speaker-mesh-typo"');

	// Clicking the step in the graph opens it in the form; the fix is one choice away.
	await graph.locator('[data-node="audio-basics"]').click();
	await expect(form).toBeVisible();
	await form.getByLabel('Answer 2: next step').selectOption('speaker-mesh');
	await expect(senior.getByRole('heading', { name: 'No problems: the check passes' })).toBeVisible();
	await senior.getByRole('button', { name: 'Submit for review' }).click();
	await expect(senior).toHaveURL(new RegExp(`/flows/${FLOW}\\?submitted=1$`));
	await expect(senior.getByRole('status').first()).toContainText('submitted');

	// The author cannot approve their own draft: no button, and the server says why.
	await senior.goto(draftUrl);
	await expect(senior.getByTestId('review-refusal')).toContainText('You wrote this draft');
	await expect(senior.getByRole('button', { name: 'Approve and publish' })).toHaveCount(0);
	const own = await senior.request.post(`/api/flows/drafts/${draftId}/approve`);
	expect(own.status()).toBe(403);
	expect((await own.json()).message).toMatch(/You wrote this draft, so you cannot approve it/);

	// A technician gets 403 on the editor and sees no authoring controls.
	expect((await tech.goto(draftUrl))?.status()).toBe(403);
	expect((await tech.goto('/flows/new'))?.status()).toBe(403);
	await tech.goto(`/flows/${FLOW}`);
	await expect(tech.getByRole('link', { name: 'Edit as a new draft' })).toHaveCount(0);

	// The lead finds it among the drafts awaiting review, reads what changed and approves.
	const lead = await as(browser, 'lead', '/flows');
	const waiting = lead.getByTestId('awaiting-review');
	await waiting.getByRole('link', { name: /No sound or microphone fault/ }).click();
	await expect(lead).toHaveURL(new RegExp(`${draftUrl}$`));
	await expect(lead.locator('[data-changed="audio-basics"]')).toContainText(NEW_TITLE);
	await lead.getByRole('button', { name: 'Approve and publish' }).click();
	await expect(lead).toHaveURL(new RegExp(`/flows/${FLOW}\\?published=2$`));
	await expect(lead.getByTestId('version-row').first()).toContainText('v2');
	await expect(lead.getByText(/approved a draft/)).toBeVisible();
	await expect(lead.getByText(/published version 2/)).toBeVisible();

	// A new run starts on version 2...
	const later = await startNoSoundRun(tech);
	await tech.goto(`/runs/${later}`);
	await ready(tech);
	await expect(tech.getByRole('heading', { level: 1 })).toHaveText(NEW_TITLE);
	await expect(tech.getByText('v2', { exact: true })).toBeVisible();

	// ...while the run started before the approval finishes on version 1.
	await tech.goto(`/runs/${earlier}`);
	await ready(tech);
	await expect(tech.getByText('v1', { exact: true })).toBeVisible();
	await expect(tech.getByRole('heading', { level: 1 })).toHaveText(OLD_TITLE);
	await tech.getByRole('button', { name: /Sound and microphones work after the basics/ }).click();
	await expect(tech.getByRole('heading', { level: 1 })).toHaveText('Sound works after the basics');
	await expect(tech.getByTestId('save-state')).toHaveText('All saved');
	const done = await (await tech.request.get(`/api/runs/${earlier}`)).json();
	expect(done).toMatchObject({ status: 'completed', flow: { id: FLOW, version: 1 } });
	expect(await (await tech.request.get(`/api/runs/${later}`)).json()).toMatchObject({
		status: 'in-progress',
		flow: { id: FLOW, version: 2 }
	});
});

test('the graph draws an answer that leads back to its own step beside the step, not behind it', async ({
	browser
}) => {
	// flows/restart-loop-after-liquid.flow.yaml: "clean-and-dry" answers "Restarts less often; dry
	// longer and test again" by staying where it is.
	const senior = await as(browser, 'senior', '/flows/restart-loop-after-liquid');
	await senior.getByRole('link', { name: 'Edit as a new draft' }).click();
	await senior.getByRole('button', { name: /Start a draft from version 1/ }).click();
	await expect(senior).toHaveURL(/\/drafts\/[0-9a-f-]{36}$/);
	await hydrated(senior);
	await senior.getByRole('tab', { name: 'Graph' }).click();
	const graph = senior.locator('[data-flow-graph]');
	const step = await graph.locator('[data-node="clean-and-dry"]').boundingBox();
	const loop = graph.getByRole('group', { name: /clean-and-dry → Restarts less often.* → clean-and-dry/ });
	// Edge labels are drawn in a layer of their own, not inside the arrow's group.
	const label = graph.getByText(/^Restarts less often; dry lo/);
	await expect(label).toBeVisible();
	const path = await loop.locator('path').first().boundingBox();
	const box = await label.boundingBox();
	expect(step && path && box).toBeTruthy();
	// The label stands beside the way up, clear of the step.
	expect(box!.x).toBeGreaterThan(step!.x + step!.width);
	// The arrow runs from below the step, past its right-hand side, to above it.
	expect(path!.x + path!.width).toBeGreaterThan(step!.x + step!.width);
	expect(path!.y).toBeLessThan(step!.y);
	expect(path!.y + path!.height).toBeGreaterThan(step!.y + step!.height);
});
