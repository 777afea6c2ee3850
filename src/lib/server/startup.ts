/**
 * What the server does once before it listens (hooks.server.ts `init`) and once as it stops, in
 * order. Add a step here as a call to an exported function of its module; a step that starts
 * something long-lived has a stop function, called in reverse order in shutdown().
 *
 * The environment and the database must work or the server does not start; any later step that
 * fails is logged and the server starts without it.
 */
import { checkServerEnv } from '$lib/server/env';
import { closeDb, getHandle, oneAtATime } from '$lib/server/db';
import { seedDemo } from '$lib/server/demo/seed';
import { importFromFiles } from '$lib/server/flows/queries';
import { seedSymptoms } from '$lib/server/symptoms/queries';
import { seedDeviceModels } from '$lib/server/jobs/device-models';
import { seedDemoJobs } from '$lib/server/jobs/demo';
import { seedDemoDay } from '$lib/server/demo/day';
import { startFakes, stopFakes } from '$lib/server/fakes';
import { startFakeS3, stopFakeS3 } from '$lib/server/fakes/s3';
import { s3Settings, startStorage } from '$lib/server/storage';
import { warnIfNoMailServer } from '$lib/server/mail/config';
import { warnIfNoWebhookSecret } from '$lib/server/payments/config';
import { startBackgroundMail, stopBackgroundMail } from '$lib/server/mail/worker';
import { historySize } from '$lib/server/insights/demo-history';
import { startDemoHistory, stopDemoHistory } from '$lib/server/demo/history-status';
import { warmUp as warmUpInsights } from '$lib/server/insights/queries';
import { startBackups, stopBackups } from '$lib/server/backup/schedule';

export async function startup() {
	// 1. The environment: a bad or missing variable stops here, named (EnvError).
	const settings = checkServerEnv();
	s3Settings(); // photo-storage settings that only work together (a key without its secret) stop here too

	// 2. The database, opened and migrated (DataDirInUseError when another process holds DATA_DIR).
	const t0 = performance.now();
	const { kind } = await getHandle();
	console.log(`[db] ${kind} ready and migrated in ${Math.round(performance.now() - t0)} ms`);

	// 2b. Photo storage, before anything stores a photo: the local fake S3 server when
	//     TIDEMARK_FAKE_S3=1 and no S3_BUCKET is set; then where photos go and whether the bucket answers.
	await step('fake S3', startFakeS3);
	await step('photo storage', startStorage);

	// 3–7 run one process at a time: processes starting together on one PostgreSQL server seed one
	// after the other, each seeing what the one before wrote (no-op on the embedded database).
	const historyWasEmpty = await oneAtATime('startup', async () => {
		// 3. The demo shop, into an empty database. Whether it had run history is decided first, before
		//    the demo's own day adds runs (step 11).
		const demo = settings.TIDEMARK_DEMO;
		const empty = demo && (await step('demo seed', () => historySize())) === 0;
		if (demo) await step('demo seed', seedDemo);

		// 4. Every start: new or changed flows/*.flow.yaml become published versions.
		await step('flow import', () => importFromFiles());

		// 5. The symptom catalogue, after the flow import so a new flow's tags are there; rows the shop
		//    edited are left alone.
		await step('symptom catalogue', seedSymptoms);

		// 6. Reference data, not demo data: intake suggests makers and models from it in every shop.
		await step('device models', seedDeviceModels);

		// 7. The demo's invented jobs, then its day (every status, runs under way), once each.
		if (demo) {
			await step('demo jobs', seedDemoJobs);
			await step('demo day', seedDemoDay);
		}
		return empty;
	});

	// 8. Demo and tests: local mail and payment services, each only when its real setting is absent.
	await step('local fakes', startFakes);

	// 9. Say what is not set up, once the fakes have had their chance.
	warnIfNoMailServer();
	warnIfNoWebhookSecret();

	// 10. Queued mail goes out in the background; without an SMTP server it waits in the queue.
	await step('mail worker', startBackgroundMail);

	// 11. After the demo seeds: a demo with no history gets one (TIDEMARK_DEMO_HISTORY).
	if (historyWasEmpty) await step('demo history', () => startDemoHistory(settings.TIDEMARK_DEMO_HISTORY));

	// 12. Scheduled backups into DATA_DIR/backups (BACKUP_SCHEDULE=off: none).
	await step('backups', startBackups);

	// 13. Last: the insights' in-process copy of the facts fills in the background.
	warmUpInsights();
}

/** Stops what start-up began, in reverse order, then closes the database last. */
export async function shutdown() {
	await step('backups', stopBackups, 'shutdown');
	await step('demo history', stopDemoHistory, 'shutdown');
	await step('mail worker', stopBackgroundMail, 'shutdown');
	await step('local fakes', stopFakes, 'shutdown');
	await step('fake S3', stopFakeS3, 'shutdown');
	await closeDb();
}

/** Runs one step; a failure is logged, and the next step runs. */
async function step<T>(name: string, run: () => Promise<T> | T, phase = 'startup'): Promise<T | undefined> {
	try {
		return await run();
	} catch (e) {
		console.error(`[${phase}] ${name} failed:`, e);
		return undefined;
	}
}
