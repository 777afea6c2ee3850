import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, getHandle, openDatabase } from '$lib/server/db';
import { storeFor } from './rate-store';
import { clearFailedSignIns, recordFailedSignIn, signInBlockedFor } from './ratelimit';
import { openLink } from './reports/gate';

const url = process.env.TEST_DATABASE_URL;
const gateEvent = (address: string) => ({
	params: { token: 'no-such-token' },
	getClientAddress: () => address
});
async function status(p: Promise<unknown>) {
	try {
		await p;
		return 200;
	} catch (e) {
		return (e as { status?: number }).status ?? 500;
	}
}

describe('rate limits on the embedded database', () => {
	beforeAll(async () => {
		await getHandle();
	}, 120_000);

	it('count in the process memory: a second store is a fresh count', async () => {
		const handle = await getHandle();
		expect(handle.kind).toBe('pglite');
		const options = { keyPrefix: 't', points: 3, duration: 60 };
		const a = storeFor(handle, options);
		expect(a.kind).toBe('memory');
		await a.add('k');
		expect((await a.add('k')).points).toBe(2);
		expect(await storeFor(handle, options).get('k')).toBeNull();
	});
});

// Several processes on one PostgreSQL server: two handles (two connection pools) stand for two
// processes, a handle opened after the other closed for a restart.
describe.runIf(url)('rate limits on a PostgreSQL server', () => {
	beforeAll(async () => {
		await closeDb();
		process.env.DATABASE_URL = url;
		expect((await getHandle()).kind).toBe('postgres');
	});
	afterAll(async () => {
		await closeDb();
		delete process.env.DATABASE_URL;
	});

	it('share one count between processes and keep it across a restart', async () => {
		const options = { keyPrefix: `t-${randomUUID()}`, points: 5, duration: 60 };
		const [one, two] = [await openDatabase(), await openDatabase()];
		try {
			const a = storeFor(one, options);
			const b = storeFor(two, options);
			expect(a.kind).toBe('database');
			// Both processes count at the same moment: the upsert is atomic, nothing is lost.
			await Promise.all(Array.from({ length: 10 }, (_, i) => (i % 2 ? a : b).add('addr')));
			expect((await b.get('addr'))?.points).toBe(10);
			await one.close();
			const again = await openDatabase();
			const after = await storeFor(again, options).get('addr');
			await again.close();
			expect(after?.points).toBe(10);
			expect(after!.until).toBeGreaterThan(Date.now() + 50_000);
		} finally {
			await two.close();
		}
	});

	it('start a new window once the old one has passed', async () => {
		const handle = await getHandle();
		const store = storeFor(handle, { keyPrefix: `t-${randomUUID()}`, points: 2, duration: 1 });
		await store.add('k', 2);
		expect((await store.get('k'))?.points).toBe(2);
		await new Promise((r) => setTimeout(r, 1100));
		expect(await store.get('k')).toBeNull();
		expect((await store.add('k')).points).toBe(1);
	});

	it('keep a blocked sign-in blocked across a restart, until a successful sign-in clears the e-mail', async () => {
		const email = `locked-${randomUUID()}@shop.test`;
		for (let i = 0; i < 10; i++) await recordFailedSignIn(email, `203.0.113.${i}`);
		expect(await signInBlockedFor(email, '203.0.113.200')).toBeGreaterThan(14 * 60);
		await closeDb(); // the process restarts: a new handle, new stores, the same table
		expect(await signInBlockedFor(email, '203.0.113.201')).toBeGreaterThan(14 * 60);
		await clearFailedSignIns(email);
		expect(await signInBlockedFor(email, '203.0.113.202')).toBe(0);
	});

	it('count bad report links per address in the database', async () => {
		const address = `198.51.100.${Math.floor(Math.random() * 250)}-${randomUUID()}`;
		for (let i = 0; i < 20; i++) expect(await status(openLink(gateEvent(address)))).toBe(404);
		await closeDb();
		expect(await status(openLink(gateEvent(address)))).toBe(429);
		expect(await status(openLink(gateEvent(`${address}-other`)))).toBe(404);
	});
});
