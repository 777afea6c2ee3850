import { closeDb, getHandle } from '$lib/server/db';

type Task = { name: string; run: () => Promise<void> | void };

/**
 * Work done once before the server listens (hooks.server.ts `init`): open and migrate the database,
 * then each registered task in order. A task that fails is logged; the app still starts.
 */
const tasks: Task[] = [];
const stopTasks: Task[] = [];

export function onStartup(name: string, run: () => Promise<void>) {
	tasks.push({ name, run });
}

export async function startup() {
	const t0 = performance.now();
	const { kind } = await getHandle();
	console.log(`[db] ${kind} ready and migrated in ${Math.round(performance.now() - t0)} ms`);
	for (const task of tasks) {
		try {
			await task.run();
		} catch (e) {
			console.error(`[startup] ${task.name} failed:`, e);
		}
	}
}

/** Work to finish before the database closes on shutdown (background workers, local services). */
export function onShutdown(name: string, run: () => Promise<void> | void) {
	stopTasks.push({ name, run });
}

/** Stops what start-up began, newest first, then closes the database last. */
export async function shutdown() {
	for (const task of stopTasks.splice(0).reverse()) {
		try {
			await task.run();
		} catch (e) {
			console.error(`[shutdown] ${task.name} failed:`, e);
		}
	}
	await closeDb();
}
