/**
 * What `npm run demo:history` needs before it writes: the database open (which takes the data
 * folder's lock and migrates), the demo staff, the flows and device models.
 */
import { closeDb, getDb } from '$lib/server/db';
import { seedDemo } from '$lib/server/demo/seed';
import * as flowLibrary from '$lib/server/flows/queries';
import { seedDeviceModels } from '$lib/server/jobs/device-models';

export { generateHistory } from './demo-history';

export async function prepareDemo() {
	await getDb();
	await seedDemo();
	await flowLibrary.importFromFiles();
	await seedDeviceModels();
}

export const close = closeDb;
