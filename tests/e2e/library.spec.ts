import fs from 'node:fs';
import { expect, test } from '@playwright/test';
import { parse } from 'yaml';
import { signIn } from './helpers';

const flowId = 'restart-loop-after-liquid';
// Every shipped flow is imported and published at start-up.
const shipped = fs.readdirSync('flows').filter((n) => n.endsWith('.flow.yaml')).length;

test('a technician reads a published flow step by step, with its cautions', async ({ page }) => {
	await signIn(page, 'tech');
	await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Library' }).click();
	await expect(page.getByRole('heading', { name: 'Library', exact: true })).toBeVisible();
	const rows = page.getByTestId('flow-row');
	// Every shipped flow, and any a journey before this one published.
	await expect(rows.first()).toBeVisible();
	expect(await rows.count()).toBeGreaterThanOrEqual(shipped);
	// Technicians do not see drafts, so the column is not there.
	await expect(page.getByText('Open drafts')).toHaveCount(0);

	const row = rows.filter({ hasText: 'Restarts in a loop' });
	await expect(row.getByRole('list', { name: 'Symptoms' }).getByText('restart-loop')).toBeVisible();
	await row.getByRole('link', { name: /^Read v\d+$/ }).click();
	await expect(page).toHaveURL(new RegExp(`/flows/${flowId}/v/\\d+$`));
	await expect(page.getByRole('heading', { level: 1 })).toContainText('Restarts in a loop');

	const steps = page.locator('article[data-kind]');
	expect(await steps.count()).toBeGreaterThanOrEqual(8);
	for (const kind of ['symptom', 'test', 'measure', 'verdict'])
		await expect(page.locator(`article[data-kind=${kind}]`).first()).toBeVisible();

	// Cautions are banners with words, the rule, and the reason one tap away.
	const battery = page.getByRole('note', { name: 'Caution: Lithium-ion battery' }).first();
	await expect(battery).toContainText('Disconnect the battery');
	const why = battery.getByText('Why');
	await why.click();
	await expect(battery.getByText(/thermal runaway/)).toBeVisible();

	// An answer links to the step it leads to.
	const first = steps.first();
	const link = first.getByRole('link').first();
	const target = (await link.getAttribute('href'))!;
	expect(target).toMatch(/^#step-/);
	await link.click();
	await expect(page.locator(target)).toBeInViewport();
});

test('a published version downloads as a .flow.yaml that parses', async ({ page }) => {
	await signIn(page, 'tech', `/flows/${flowId}`);
	const versionLink = page
		.getByTestId('version-row')
		.first()
		.getByRole('link', { name: /^v\d+$/ });
	const version = (await versionLink.textContent())!.slice(1);
	const response = await page.request.get(`/flows/${flowId}/v/${version}/download`);
	expect(response.status()).toBe(200);
	expect(response.headers()['content-disposition']).toBe(`attachment; filename="${flowId}.flow.yaml"`);
	const text = await response.text();
	expect(text.split('\n')[0]).toBe('# yaml-language-server: $schema=./flow.schema.json');
	const flow = parse(text);
	expect(flow).toMatchObject({ id: flowId, start: expect.any(String) });
	expect(Object.keys(flow.steps).length).toBeGreaterThanOrEqual(8);

	// The JSON API serves the same version; bad and unknown versions are refused cleanly.
	const api = await page.request.get(`/api/flows/${flowId}/versions/${version}`);
	expect(await api.json()).toMatchObject({
		flowId,
		version: Number(version),
		status: 'published',
		definition: { id: flowId }
	});
	expect((await page.request.get(`/api/flows/${flowId}/versions/abc`)).status()).toBe(400);
	expect((await page.request.get(`/api/flows/${flowId}/versions/999`)).status()).toBe(404);
	expect((await page.goto(`/flows/${flowId}/v/999`))?.status()).toBe(404);
	const list = await (await page.request.get('/api/flows')).json();
	expect(list.flows.find((f: { id: string }) => f.id === flowId)).toMatchObject({
		openDrafts: null,
		runs: expect.any(Number)
	});
});

test('seniors see open drafts in the library; the API wants a session', async ({ page, request }) => {
	expect((await request.get('/api/flows')).status()).toBe(401);
	await signIn(page, 'senior', '/flows');
	await expect(page.getByText('Open drafts').first()).toBeVisible();
});
