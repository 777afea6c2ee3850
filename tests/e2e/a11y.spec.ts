import fs from 'node:fs';
import path from 'node:path';
import AxeBuilder from '@axe-core/playwright';
import { expect, test, type Browser, type Page } from '@playwright/test';
import { createJob, hydrated, signIn, startRun, walkToVerdict } from './helpers';

// Every page through axe-core in both themes at tablet and desktop width: any WCAG 2.0/2.1/2.2
// A or AA violation fails the journey, with the rule, the impact and the first offending nodes.
const TAGS = ['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa', 'wcag22a', 'wcag22aa'];
const VIEWPORTS = [
	{ name: 'tablet', width: 820, height: 1180 },
	{ name: 'desktop', width: 1280, height: 900 }
] as const;
const THEMES = ['light', 'dark'] as const;

type Summary = { rule: string; impact: string | null | undefined; help: string; nodes: string[] };

async function violations(page: Page): Promise<Summary[]> {
	const result = await new AxeBuilder({ page }).withTags(TAGS).analyze();
	return result.violations.map((v) => ({
		rule: v.id,
		impact: v.impact,
		help: v.help,
		nodes: v.nodes.slice(0, 5).map((n) => `${n.target.join(' ')} — ${n.failureSummary ?? ''}`)
	}));
}

async function contextFor(
	browser: Browser,
	theme: (typeof THEMES)[number],
	viewport: (typeof VIEWPORTS)[number]
) {
	const context = await browser.newContext({ viewport: { width: viewport.width, height: viewport.height } });
	const origin = new URL(test.info().project.use.baseURL ?? 'http://localhost').origin;
	await context.addCookies([{ name: 'theme', value: theme, url: origin }]);
	return context;
}

function mailLinks(): string[] {
	const dir = path.join(process.env.E2E_DATA_DIR ?? '.e2e-data', 'fake_mailbox');
	if (!fs.existsSync(dir)) return [];
	return fs
		.readdirSync(dir)
		.filter((f) => f.endsWith('.json'))
		.flatMap((f) => {
			const mail = JSON.parse(fs.readFileSync(path.join(dir, f), 'utf8')) as { text: string };
			return [...mail.text.matchAll(/https?:\/\/\S+?(\/r\/[A-Za-z0-9_-]{43})/g)].map((m) => m[1]);
		});
}

/** A job with a run in progress, a sent report (for the customer link and the outbox) and ids for every page. */
async function fixtures(page: Page) {
	const { flows } = (await (await page.request.get('/api/flows')).json()) as { flows: { id: string }[] };
	const flowId = flows[0]?.id ?? 'restart-loop-after-liquid';
	const jobId = await createJob(page, { symptoms: ['restart-loop'], dataFirst: false });
	const runId = await startRun(page, jobId, flowId);
	// A second run, walked to its verdict, so the checklists page has something to show.
	const doneJobId = await createJob(page, { symptoms: ['restart-loop'], dataFirst: false });
	await walkToVerdict(page, await startRun(page, doneJobId, flowId));
	const before = new Set(mailLinks());
	await page.goto(`/jobs/${jobId}`);
	await hydrated(page);
	await page.locator('[data-section="customer"]').getByRole('button', { name: 'Send report' }).click();
	await expect
		.poll(() => mailLinks().filter((l) => !before.has(l)).length, { timeout: 20_000 })
		.toBeGreaterThan(0);
	const customerLink = mailLinks().find((l) => !before.has(l))!;
	await page.goto('/outbox');
	const outboxHref = await page.locator('a[href^="/outbox/"]').first().getAttribute('href');
	return { flowId, jobId, doneJobId, runId, customerLink, outboxHref: outboxHref ?? '/outbox' };
}

/** goto, once more if a navigation the previous page started cut it short (net::ERR_ABORTED). */
async function visit(page: Page, url: string) {
	try {
		return await page.goto(url);
	} catch (e) {
		if (!String(e).includes('ERR_ABORTED')) throw e;
		await page.waitForLoadState('load');
		return page.goto(url);
	}
}

test('every page passes axe-core (WCAG 2.2 A/AA) in both themes at tablet and desktop width', async ({
	page,
	browser
}) => {
	test.setTimeout(300_000);
	await signIn(page, 'lead');
	const f = await fixtures(page);
	const staffPages = [
		'/',
		'/jobs',
		'/jobs/new',
		`/jobs/${f.jobId}`,
		`/jobs/${f.doneJobId}/checklists`,
		`/jobs/${f.jobId}/label`,
		`/jobs/${f.jobId}/report`,
		`/runs/${f.runId}`,
		'/flows',
		'/flows/new',
		'/flows/symptoms',
		`/flows/${f.flowId}`,
		`/flows/${f.flowId}/v/1`,
		`/flows/${f.flowId}/diff`,
		`/flows/${f.flowId}/drafts/new`,
		'/insights',
		'/outbox',
		f.outboxHref,
		'/staff',
		'/settings',
		'/account',
		'/help',
		'/help/technician',
		'/help/senior',
		'/help/lead',
		'/help/cautions',
		'/help/writing-flows'
	];
	const publicPages = ['/signin', f.customerLink];
	const storage = await page.context().storageState();

	const found: Record<string, Summary[]> = {};
	for (const theme of THEMES) {
		for (const viewport of VIEWPORTS) {
			const anon = await contextFor(browser, theme, viewport);
			const anonPage = await anon.newPage();
			for (const url of publicPages) {
				await visit(anonPage, url);
				const v = await violations(anonPage);
				if (v.length) found[`${url} ${theme} ${viewport.name}`] = v;
			}
			await anon.close();

			const staff = await contextFor(browser, theme, viewport);
			await staff.addCookies(storage.cookies);
			const staffPage = await staff.newPage();
			for (const url of staffPages) {
				const res = await visit(staffPage, url);
				expect(res?.status(), url).toBeLessThan(400);
				await hydrated(staffPage);
				const v = await violations(staffPage);
				if (v.length) found[`${url} ${theme} ${viewport.name}`] = v;
			}
			await staff.close();
		}
	}
	expect(found).toEqual({});
});
