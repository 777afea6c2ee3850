import { afterEach, describe, expect, it } from 'vitest';
import { getStore, MemoryStore, S3Store, startStorage } from '$lib/server/storage';
import { s3Settings } from '$lib/server/storage/config';
import { fakeS3Wanted, startFakeS3, stopFakeS3 } from './s3';

const names = ['TIDEMARK_FAKE_S3', 'S3_BUCKET', 'S3_ENDPOINT', 'S3_ACCESS_KEY_ID', 'S3_SECRET_ACCESS_KEY'];
const saved = Object.fromEntries(names.map((k) => [k, process.env[k]]));
afterEach(async () => {
	await stopFakeS3();
	for (const [k, v] of Object.entries(saved)) {
		if (v === undefined) delete process.env[k];
		else process.env[k] = v;
	}
});

describe('the local fake S3 server', () => {
	it('is started only when asked for and no real bucket is set', async () => {
		expect(fakeS3Wanted({})).toBe(false);
		expect(fakeS3Wanted({ TIDEMARK_FAKE_S3: '1' })).toBe(true);
		expect(fakeS3Wanted({ TIDEMARK_FAKE_S3: '1', S3_BUCKET: 'shop-photos' })).toBe(false);
		delete process.env.TIDEMARK_FAKE_S3;
		expect(await startFakeS3()).toBeNull();
		expect(getStore()).toBeInstanceOf(MemoryStore);
	});

	it('takes the photos while it runs, on 127.0.0.1, and hands them back to the default store when stopped', async () => {
		process.env.TIDEMARK_FAKE_S3 = '1';
		delete process.env.S3_BUCKET;
		const fake = (await startFakeS3())!;
		expect(fake.settings.endpoint).toMatch(/^http:\/\/127\.0\.0\.1:\d+$/);
		expect(s3Settings()).toMatchObject({ fake: true, bucket: 'tidemark-photos', forcePathStyle: true });
		const store = getStore();
		expect(store).toBeInstanceOf(S3Store);
		const { key } = await store.put(new TextEncoder().encode('a photo through the fake'));
		expect(new TextDecoder().decode((await store.get(key))!)).toBe('a photo through the fake');

		// The start-up check passes for the fake's bucket and fails loudly for a bucket that is not there.
		await expect(startStorage()).resolves.toBeUndefined();
		process.env.S3_BUCKET = 'no-such-bucket';
		process.env.S3_ENDPOINT = fake.settings.endpoint;
		process.env.S3_ACCESS_KEY_ID = 'S3RVER';
		process.env.S3_SECRET_ACCESS_KEY = 'S3RVER';
		await expect(startStorage()).rejects.toThrow();
		for (const k of names.slice(1)) delete process.env[k];

		await stopFakeS3();
		expect(s3Settings()).toBeNull();
		expect(getStore()).toBeInstanceOf(MemoryStore);
		await expect(store.get(key)).rejects.toThrow();
	});
});
