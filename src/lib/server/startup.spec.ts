import { afterEach, beforeAll, describe, expect, it, vi } from 'vitest';
import { getDb } from '$lib/server/db';
import { deviceModels } from '$lib/server/db/schema/jobs';
import { EnvError } from '$lib/server/env';
import { lastImport } from '$lib/server/flows/queries';
import * as mailQueue from '$lib/server/mail/queue';
import { shutdown, startup } from './startup';

// Opening and migrating an in-memory database is the slow part; startup() then finds it open.
beforeAll(async () => {
	await getDb();
});

afterEach(() => {
	delete process.env.DATABASE_POOL_SIZE;
	vi.restoreAllMocks();
});

describe('startup()', () => {
	it('stops at a bad variable, naming it, before anything else runs', async () => {
		process.env.DATABASE_POOL_SIZE = 'many';
		const error = await startup().catch((e: unknown) => e);
		expect(error).toBeInstanceOf(EnvError);
		expect((error as EnvError).message).toContain('DATABASE_POOL_SIZE');
		expect(lastImport()).toBeUndefined();
	});

	it('runs its steps (flows, reference data, mail worker), and shutdown() stops them and closes the database', async () => {
		const wake = vi.spyOn(mailQueue, 'setWake');
		await startup();
		expect(lastImport()?.imported.length).toBeGreaterThan(0);
		const db = await getDb();
		expect((await db.select().from(deviceModels)).length).toBeGreaterThan(0);
		// The mail worker registered its wake-up, and takes it back on shutdown.
		expect(wake.mock.calls.at(-1)?.[0]).toBeTypeOf('function');
		await shutdown();
		expect(wake.mock.calls.at(-1)?.[0]).toBeNull();
		// The database was closed: the next call opens a new one.
		expect(await getDb()).not.toBe(db);
	}, 120_000);
});
