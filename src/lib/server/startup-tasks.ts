// Start-up tasks, registered in the order they run. Add a line here for a new one.
import { onShutdown, onStartup } from '$lib/server/startup';
import { generateHistory, historySize } from '$lib/server/insights/demo-history';
import { warmUp as warmUpInsights } from '$lib/server/insights/queries';
import { seedDemo } from '$lib/server/demo/seed';
import * as flowLibrary from '$lib/server/flows/queries';
import { startFakes, stopFakes } from '$lib/server/fakes';
import { smtpUrl } from '$lib/server/mail/config';
import { startMailWorker } from '$lib/server/mail/worker';
import { registerJobPayments } from '$lib/server/reports/customer';
import { seedDeviceModels } from '$lib/server/jobs/device-models';
import { seedDemoJobs } from '$lib/server/jobs/demo';
import { seedDemoDay } from '$lib/server/demo/day';
import { DEFAULT_HISTORY_RUNS, fillHistory, stopHistory } from '$lib/server/demo/history-status';
import { seedSymptoms } from '$lib/server/symptoms/queries';

const demo = process.env.TIDEMARK_DEMO === '1';
/** Whether the demo started with no run history: decided before the demo's own day adds runs. */
let historyWasEmpty = false;

onStartup('demo seed', async () => {
	if (!demo) return;
	historyWasEmpty = (await historySize()) === 0;
	await seedDemo();
});

// Every start, demo or not: new or changed flows/*.flow.yaml become published versions.
onStartup('flow import', async () => {
	await flowLibrary.importFromFiles();
});

// The symptom catalogue: the starting list and every flow tag it lacks (after the flow import, so
// a new flow's tags are there); rows the shop edited are left alone.
onStartup('symptom catalogue', async () => {
	await seedSymptoms();
});

// Reference data, not demo data: intake suggests makers and models from it in every shop.
onStartup('device models', async () => {
	await seedDeviceModels();
});

// A few invented jobs for the demo shop, once, when there are none; then the shop's day (jobs in
// every status, runs under way, drafts in review), once, so every role's Today has something.
onStartup('demo jobs', async () => {
	if (!demo) return;
	await seedDemoJobs();
	await seedDemoDay();
});

// Demo and tests (TIDEMARK_DEMO=1 or TIDEMARK_FAKES=1): local mail and payment services, each only
// when its real setting (SMTP_URL, STRIPE_SECRET_KEY) is absent.
onStartup('local fakes', async () => {
	await startFakes();
	onShutdown('local fakes', stopFakes);
});

// Job payments: a confirmed payment updates the quote and queues the receipt (reports/customer.ts).
onStartup('job payments', async () => {
	registerJobPayments();
});

// Sends queued mail in the background; without an SMTP server mail waits in the queue.
onStartup('mail worker', async () => {
	if (!smtpUrl())
		console.warn('[mail] SMTP_URL is not set: e-mail stays queued until it is (see the Outbox).');
	if (process.env.STRIPE_SECRET_KEY && !process.env.STRIPE_WEBHOOK_SECRET) {
		console.warn('[payments] STRIPE_WEBHOOK_SECRET is not set: payment confirmations will be refused.');
	}
	const worker = startMailWorker();
	onShutdown('mail worker', () => worker.stop());
});

// Keep last, after the demo seeds. A demo that started with no history fills a year of it in the
// background once the server listens (progress in the console, a notice on Today and Insights).
// TIDEMARK_DEMO_HISTORY=0 skips it; =N (end-to-end tests) writes N runs before the server listens.
// Then the insights' in-process copy of the facts fills in the background.
onStartup('insights', async () => {
	const setting = process.env.TIDEMARK_DEMO_HISTORY;
	const wanted = setting === undefined || setting === '' ? null : Number(setting);
	if (demo && historyWasEmpty) {
		if (wanted === 0)
			console.log('[demo] TIDEMARK_DEMO_HISTORY=0: no invented history (`npm run demo:history` adds it).');
		else if (wanted && wanted > 0) await generateHistory({ runs: wanted, seed: 6, extraTechnicians: false });
		// adapter-node listens as soon as the start-up tasks return; the fill starts just after.
		else {
			let running: Promise<unknown> | null = null;
			const timer = setTimeout(() => (running = fillHistory(DEFAULT_HISTORY_RUNS)), 200);
			onShutdown('demo history', () => {
				clearTimeout(timer);
				return stopHistory(running);
			});
		}
	}
	warmUpInsights();
});
