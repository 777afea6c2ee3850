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
import { seedSymptoms } from '$lib/server/symptoms/queries';

onStartup('demo seed', async () => {
	if (process.env.TIDEMARK_DEMO === '1') await seedDemo();
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

// A few invented jobs for the demo shop, once, when there are none.
onStartup('demo jobs', async () => {
	if (process.env.TIDEMARK_DEMO === '1') await seedDemoJobs();
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

// Keep last, after the demo seeds. TIDEMARK_DEMO_HISTORY=N (end-to-end tests) writes N invented runs
// into an empty history; a demo without history says how to fill it; then the insights' in-process
// copy of the facts fills in the background.
onStartup('insights', async () => {
	const wanted = Number(process.env.TIDEMARK_DEMO_HISTORY ?? 0);
	const size = process.env.TIDEMARK_DEMO === '1' ? await historySize() : -1;
	if (wanted > 0 && size === 0) await generateHistory({ runs: wanted, seed: 6, extraTechnicians: false });
	else if (size === 0)
		console.log('[insights] no run history yet: stop the app and run `npm run demo:history -- --runs 5000`.');
	warmUpInsights();
});
