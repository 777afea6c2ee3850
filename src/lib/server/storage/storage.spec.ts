import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { PutObjectCommand } from '@aws-sdk/client-s3';
import { runFakeS3, type FakeS3 } from '$lib/server/fakes/s3';
import { isStorageKey, keyOf, LocalStore, MemoryStore, S3Store, type BlobStore } from './index';
import { copyBlobs } from './copy';

const enc = (s: string) => new TextEncoder().encode(s);
// FIPS 180-2, Appendix B.1: SHA-256("abc").
const abcDigest = 'ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad';

const tmpRoot = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-store-'));

// The S3 lane: the local fake S3 server on a free port, its objects in a temp folder.
let fakeS3: FakeS3;
let bucketCount = 0;
beforeAll(async () => {
	fakeS3 = await runFakeS3({ dir: path.join(tmpRoot, 'fake-s3') });
});
afterAll(async () => {
	await fakeS3?.stop();
	fs.rmSync(tmpRoot, { recursive: true, force: true });
});

/** Each S3 test gets a bucket of its own on the fake, so counts start from nothing. */
async function freshS3Store() {
	const store = S3Store.from({ ...fakeS3.settings, fake: true });
	const bucket = `spec-${++bucketCount}`;
	const { CreateBucketCommand } = await import('@aws-sdk/client-s3');
	await store.client.send(new CreateBucketCommand({ Bucket: bucket }));
	return new S3Store(store.client, bucket);
}

const stores: [string, () => BlobStore | Promise<BlobStore>][] = [
	['memory', () => new MemoryStore()],
	['local disk', () => new LocalStore(fs.mkdtempSync(path.join(tmpRoot, 's-')))],
	['S3 (local fake)', freshS3Store]
];

async function allKeys(store: BlobStore) {
	const keys = [];
	for await (const k of store.keys()) keys.push(k);
	return keys.sort();
}

describe.each(stores)('%s store', (_name, make) => {
	it('keys a blob by the SHA-256 of its bytes', async () => {
		const store = await make();
		const { key, size, created } = await store.put(enc('abc'));
		expect(key).toBe(abcDigest);
		expect({ size, created }).toEqual({ size: 3, created: true });
		expect(await store.get(key)).toEqual(enc('abc'));
		expect(await store.stat(key)).toEqual({ size: 3 });
	});

	it('lists every stored key once', async () => {
		const store = await make();
		expect(await allKeys(store)).toEqual([]);
		const a = await store.put(enc('first'));
		const b = await store.put(enc('second'));
		await store.put(enc('first'));
		expect(await allKeys(store)).toEqual([a.key, b.key].sort());
		await store.delete(a.key);
		expect(await allKeys(store)).toEqual([b.key]);
	});

	it('round-trips bytes of every value, and a photo-sized blob', async () => {
		const store = await make();
		const every = Uint8Array.from({ length: 256 }, (_, i) => i);
		const big = new Uint8Array(3 * 1024 * 1024).map((_, i) => (i * 7919) % 251);
		for (const bytes of [every, big]) {
			const { key } = await store.put(bytes);
			const back = await store.get(key);
			// Compared as buffers: a deep equality over millions of elements takes half a minute.
			expect(back && Buffer.from(back).equals(Buffer.from(bytes))).toBe(true);
			expect(await store.stat(key)).toEqual({ size: bytes.byteLength });
		}
	});

	it('stores the same bytes once and gives them the same key', async () => {
		const store = await make();
		const first = await store.put(enc('same bytes'));
		const second = await store.put(enc('same bytes'));
		expect(second.key).toBe(first.key);
		expect(second.created).toBe(false);
		expect((await store.put(enc('other bytes'))).key).not.toBe(first.key);
	});

	it('answers null for an unknown key and deletes once', async () => {
		const store = await make();
		const { key } = await store.put(enc('to delete'));
		expect(await store.delete(key)).toBe(true);
		expect(await store.delete(key)).toBe(false);
		expect(await store.get(key)).toBeNull();
		expect(await store.stat(key)).toBeNull();
	});

	it('refuses anything that is not a 64-digit lower-case hex key (no path can be formed)', async () => {
		const store = await make();
		for (const bad of [
			'../../etc/passwd',
			abcDigest.toUpperCase(),
			abcDigest.slice(1),
			`${abcDigest}/x`,
			''
		]) {
			await expect(store.get(bad)).rejects.toThrow(/storage key/);
			await expect(store.delete(bad)).rejects.toThrow(/storage key/);
		}
	});
});

describe('local disk layout', () => {
	it('shards by the first two pairs of hex digits and leaves no temp file behind', async () => {
		const root = fs.mkdtempSync(path.join(tmpRoot, 'layout-'));
		const store = new LocalStore(root);
		const { key } = await store.put(enc('abc'));
		expect(fs.readFileSync(path.join(root, 'ba', '78', abcDigest), 'utf8')).toBe('abc');
		expect(store.pathOf(key)).toBe(path.join(root, 'ba', '78', abcDigest));
		expect(fs.readdirSync(path.join(root, 'tmp'))).toEqual([]);
	});
});

describe('S3 store', () => {
	it('names objects by the same shards as the disk, with no public ACL', async () => {
		const store = await freshS3Store();
		const { key } = await store.put(enc('abc'));
		expect(store.objectName(key)).toBe(`ba/78/${abcDigest}`);
		const { GetObjectAclCommand } = await import('@aws-sdk/client-s3');
		const acl = await store.client.send(
			new GetObjectAclCommand({ Bucket: store.bucket, Key: store.objectName(key) })
		);
		const grantees = (acl.Grants ?? []).map((g) => g.Grantee?.URI).filter(Boolean);
		expect(grantees).not.toContainEqual(expect.stringMatching(/AllUsers|AuthenticatedUsers/));
	});

	it('refuses an object whose bytes are not what its key names (replaced behind the app)', async () => {
		const store = await freshS3Store();
		const { key } = await store.put(enc('the real photo'));
		await store.client.send(
			new PutObjectCommand({ Bucket: store.bucket, Key: store.objectName(key), Body: enc('something else') })
		);
		await expect(store.get(key)).rejects.toThrow(/does not match its key/);
	});

	it('tells a missing object (null) from a store that cannot be reached or read (an error)', async () => {
		const store = await freshS3Store();
		expect(await store.get(abcDigest)).toBeNull();
		const noBucket = new S3Store(store.client, 'no-such-bucket');
		await expect(noBucket.get(abcDigest)).rejects.toThrow(/bucket/i);
		await expect(noBucket.check()).rejects.toThrow();
		// (The fake refuses an unknown access key; it does not check the signature itself.)
		const wrongKey = S3Store.from({
			...fakeS3.settings,
			credentials: { accessKeyId: 'NOT-A-KEY', secretAccessKey: 'S3RVER' },
			fake: true
		});
		await expect(new S3Store(wrongKey.client, store.bucket).get(abcDigest)).rejects.toThrow();
		const closed = S3Store.from({ ...fakeS3.settings, endpoint: 'http://127.0.0.1:9', fake: true });
		await expect(closed.get(abcDigest)).rejects.toThrow();
	});
});

describe('moving photos from the local folder to S3', () => {
	it('copies every blob once, can run again, and the target then holds the same bytes', async () => {
		const local = new LocalStore(fs.mkdtempSync(path.join(tmpRoot, 'move-')));
		const blobs = ['thumb', 'display', 'original', 'another'].map((s) => enc(`${s} bytes`));
		for (const b of blobs) await local.put(b);
		const s3 = await freshS3Store();
		await s3.put(blobs[3]); // already there from an interrupted run
		expect(await copyBlobs(local, s3)).toEqual({
			copied: 3,
			present: 1,
			bytes: blobs.slice(0, 3).reduce((n, b) => n + b.byteLength, 0)
		});
		expect(await allKeys(s3)).toEqual(await allKeys(local));
		for (const b of blobs) expect(await s3.get(keyOf(b))).toEqual(b);
		expect(await copyBlobs(local, s3)).toMatchObject({ copied: 0, present: 4 });
	});
});

describe('keys', () => {
	it('recognises well-formed keys only', () => {
		expect(keyOf(enc('abc'))).toBe(abcDigest);
		expect(isStorageKey(abcDigest)).toBe(true);
		expect(isStorageKey('g'.repeat(64))).toBe(false);
		expect(isStorageKey(42)).toBe(false);
	});
});
