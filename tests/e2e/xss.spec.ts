import { expect, test, type Browser, type Page } from '@playwright/test';
import { createJob, hydrated, signIn, startRun, testImei, type accounts } from './helpers';
import { PAYLOADS, xssFlow as payloadFlow } from './xss-flow';

// A new id each time, so the spec can run again against the same server.
const xssFlow = { ...payloadFlow, id: `xss-payloads-${Date.now().toString(36)}` };

// Common XSS payloads in a step body, a summary and a verdict (tests/e2e/xss-flow.ts), rendered in
// Chromium where flow markdown shows: the editor's preview, the read-only version and the run
// screen. None may run: window.__xss is never set and no dialog opens, and the rendered markdown
// holds no script, frame, event handler or javascript: link (the second check would catch a
// broken sanitiser even where the CSP still blocks the script).

type Seen = { dialogs: string[] };

async function as(browser: Browser, who: keyof typeof accounts, seen: Seen) {
	const context = await browser.newContext();
	// Every content-security-policy violation is kept: zod's eval probe used to report one on each
	// page that validates (it now runs jitless), and a payload that reached the DOM would report one.
	await context.addInitScript(() =>
		document.addEventListener('securitypolicyviolation', (e) => {
			const w = window as unknown as { __csp?: string[] };
			(w.__csp ??= []).push(`${e.violatedDirective} ${e.blockedURI}`);
		})
	);
	const page = await context.newPage();
	page.on('dialog', async (d) => {
		seen.dialogs.push(d.message());
		await d.dismiss();
	});
	await signIn(page, who);
	return page;
}

/** Every rendered markdown block on the page is inert, and nothing ran. */
async function assertInert(page: Page, seen: Seen, where: string) {
	const blocks = page.locator('.tm-markdown');
	await expect(
		page.locator('.tm-markdown:visible').filter({ hasText: 'Payloads below' }).first()
	).toBeVisible();
	const found = await blocks.evaluateAll((els) =>
		els.flatMap((el) =>
			[...el.querySelectorAll('*')].flatMap((n) => {
				const bad: string[] = [];
				if (['SCRIPT', 'IFRAME', 'OBJECT', 'EMBED', 'FRAME', 'STYLE'].includes(n.tagName.toUpperCase()))
					bad.push(n.tagName);
				for (const a of n.getAttributeNames())
					if (a.startsWith('on') || a === 'srcdoc') bad.push(`${n.tagName}[${a}]`);
				const href = n.getAttribute('href') ?? n.getAttribute('xlink:href') ?? '';
				if (/^\s*javascript:/i.test(href)) bad.push(`${n.tagName}[href=${href}]`);
				return bad;
			})
		)
	);
	expect(found, where).toEqual([]);
	// Links that survive are clicked: a javascript: one would run now.
	const links = blocks.locator('a');
	for (let i = 0; i < (await links.count()); i++) {
		const href = (await links.nth(i).getAttribute('href')) ?? '';
		if (!href.startsWith('http')) await links.nth(i).click({ force: true, noWaitAfter: true });
	}
	await page.waitForTimeout(300);
	expect(await page.evaluate(() => (window as unknown as { __xss?: unknown }).__xss), where).toBeUndefined();
	expect(seen.dialogs, where).toEqual([]);
	// zod runs jitless: no page reports an eval attempt any more. (Inline-handler reports from the
	// payloads in markdown are known: the browser is shown them and the CSP blocks them.)
	expect(
		(await cspViolations(page)).filter((v) => v.includes('eval')),
		where
	).toEqual([]);
}

async function cspViolations(page: Page) {
	return page.evaluate(() => (window as unknown as { __csp?: string[] }).__csp ?? []);
}

test('XSS payloads in flow markdown never run: editor preview, version view, run screen', async ({
	browser
}) => {
	test.setTimeout(120_000);
	const seen: Seen = { dialogs: [] };
	const senior = await as(browser, 'senior', seen);
	const created = await senior.request.post('/api/flows/drafts', { data: { definition: xssFlow } });
	expect(created.status(), await created.text()).toBe(201);
	const draft = (await created.json()) as { id: string };

	// The editor: the start step's body in the live preview, and a payload typed afresh.
	await senior.goto(`/flows/${xssFlow.id}/drafts/${draft.id}`);
	const form = senior.locator('[data-step-form="look"]');
	await expect(form.locator('[data-preview]')).toBeVisible();
	await assertInert(senior, seen, 'editor preview');
	// The form is server-rendered: type again until the hydrated editor's preview shows it.
	await expect(async () => {
		await form.getByLabel(/Instructions/).fill(PAYLOADS.join('\n\n') + '\n\nPayloads below, typed.');
		await expect(form.locator('[data-preview]')).toContainText('Payloads below, typed.', { timeout: 1000 });
	}).toPass();
	await assertInert(senior, seen, 'editor preview after typing');

	// Published, the same text shows read-only and on the run screen.
	await expect(senior.locator('[data-save-status="saved"]')).toBeVisible();
	expect((await senior.request.post(`/api/flows/drafts/${draft.id}/submit`)).status()).toBe(200);
	const lead = await as(browser, 'lead', seen);
	expect((await lead.request.post(`/api/flows/drafts/${draft.id}/approve`)).status()).toBe(200);

	const tech = await as(browser, 'tech', seen);
	await tech.goto(`/flows/${xssFlow.id}/v/1`);
	await assertInert(tech, seen, 'version view');
	await tech.goto(`/flows/${xssFlow.id}`);
	await assertInert(tech, seen, 'flow page summary');

	const job = await createJob(tech, {
		customerName: 'Pim Ardent',
		customerEmail: 'pim@example.test',
		model: 'Tern 6',
		imei: testImei('0066'),
		symptoms: ['no-power']
	});
	await tech.goto(`/runs/${await startRun(tech, job, xssFlow.id)}`);
	await expect(tech.locator('[data-ready="true"]')).toBeVisible();
	await assertInert(tech, seen, 'run screen step');
	await tech.getByRole('button', { name: /Looked/ }).click();
	await expect(tech.getByRole('heading', { level: 1 })).toHaveText('Payload verdict');
	await assertInert(tech, seen, 'run screen verdict');
});

// Script payloads in every free-text field a technician fills (the customer's name, the device,
// the serial, intake notes, a status note, step notes, a photo caption), rendered on every page that
// shows them: the job list, the job page, its label, the staff report and the run screen.
const short = {
	img: '<img src=x onerror="window.__xss=\'img\'">',
	svg: '<svg onload="window.__xss=\'svg\'">',
	script: '<script>window.__xss="script"</script>',
	tpl: '{{constructor.constructor("window.__xss=1")()}}'
};

/** The page is inert: nothing ran, no dialog, no CSP report, and no payload became an element. */
async function assertNothingRan(page: Page, seen: Seen, where: string) {
	await page.waitForTimeout(300);
	expect(await page.evaluate(() => (window as unknown as { __xss?: unknown }).__xss), where).toBeUndefined();
	expect(seen.dialogs, where).toEqual([]);
	expect(await cspViolations(page), where).toEqual([]);
	const live = await page.evaluate(() =>
		[...document.querySelectorAll('img[onerror], svg[onload], [onerror], [onload]')].map((n) => n.outerHTML)
	);
	expect(live, where).toEqual([]);
}

test('script payloads in free-text fields never run: job list, job page, label, report, run screen', async ({
	browser
}) => {
	test.setTimeout(120_000);
	const seen: Seen = { dialogs: [] };
	const tech = await as(browser, 'tech', seen);
	const job = await createJob(tech, {
		customerName: `Pim ${short.img}`,
		maker: `Corvana ${short.svg}`,
		model: `Tern ${short.script}`,
		serial: '<svg onload=alert(1)>',
		imei: testImei('0067'),
		notes: [...PAYLOADS, short.tpl].join('\n'),
		symptoms: ['restart-loop']
	});
	const detail = (await (await tech.request.get(`/api/jobs/${job}`)).json()) as { next: string[] };
	const moved = await tech.request.patch(`/api/jobs/${job}`, {
		data: { status: detail.next[0], note: `${short.img} ${short.script}` }
	});
	expect(moved.status(), await moved.text()).toBe(200);
	const run = await startRun(tech, job, 'restart-loop-after-liquid');
	const answered = await tech.request.post(`/api/runs/${run}/events`, {
		data: {
			type: 'ANSWER',
			stepId: 'power-on-as-received',
			outcome: 0,
			idempotencyKey: `xss-${Date.now()}`,
			notes: `${short.img} ${short.svg} ${short.tpl}`
		}
	});
	expect(answered.status(), await answered.text()).toBe(200);
	const photo = await tech.request.post(`/api/jobs/${job}/photos`, {
		headers: { origin: new URL(tech.url()).origin }, // SvelteKit's CSRF check wants it on multipart posts
		multipart: {
			file: { name: `${short.img}.png`, mimeType: 'image/png', buffer: await tinyPng() },
			caption: `${short.svg} ${short.script}`,
			source: 'phone'
		}
	});
	expect(photo.status(), await photo.text()).toBe(201);

	for (const path of ['/jobs', `/jobs/${job}`, `/jobs/${job}/label`, `/jobs/${job}/report`, `/runs/${run}`]) {
		await tech.goto(path);
		await hydrated(tech);
		await assertNothingRan(tech, seen, path);
	}
	// The payloads are shown, as text.
	await tech.goto(`/jobs/${job}`);
	await expect(tech.getByText(`Pim ${short.img}`).first()).toBeVisible();
});

async function tinyPng() {
	const { default: sharp } = await import('sharp');
	return sharp({ create: { width: 32, height: 24, channels: 3, background: { r: 10, g: 90, b: 160 } } })
		.png()
		.toBuffer();
}
