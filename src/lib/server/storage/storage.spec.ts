import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { isStorageKey, keyOf, LocalStore, MemoryStore, type BlobStore } from './index';

const enc = (s: string) => new TextEncoder().encode(s);
// FIPS 180-2, Appendix B.1: SHA-256("abc").
const abcDigest = 'ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad';

const tmpRoot = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-store-'));
afterAll(() => fs.rmSync(tmpRoot, { recursive: true, force: true }));

const stores: [string, () => BlobStore][] = [
	['memory', () => new MemoryStore()],
	['local disk', () => new LocalStore(fs.mkdtempSync(path.join(tmpRoot, 's-')))]
];

describe.each(stores)('%s store', (_name, make) => {
	it('keys a blob by the SHA-256 of its bytes', async () => {
		const store = make();
		const { key, size, created } = await store.put(enc('abc'));
		expect(key).toBe(abcDigest);
		expect({ size, created }).toEqual({ size: 3, created: true });
		expect(await store.get(key)).toEqual(enc('abc'));
		expect(await store.stat(key)).toEqual({ size: 3 });
	});

	it('stores the same bytes once and gives them the same key', async () => {
		const store = make();
		const first = await store.put(enc('same bytes'));
		const second = await store.put(enc('same bytes'));
		expect(second.key).toBe(first.key);
		expect(second.created).toBe(false);
		expect((await store.put(enc('other bytes'))).key).not.toBe(first.key);
	});

	it('answers null for an unknown key and deletes once', async () => {
		const store = make();
		const { key } = await store.put(enc('to delete'));
		expect(await store.delete(key)).toBe(true);
		expect(await store.delete(key)).toBe(false);
		expect(await store.get(key)).toBeNull();
		expect(await store.stat(key)).toBeNull();
	});

	it('refuses anything that is not a 64-digit lower-case hex key (no path can be formed)', async () => {
		const store = make();
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

describe('keys', () => {
	it('recognises well-formed keys only', () => {
		expect(keyOf(enc('abc'))).toBe(abcDigest);
		expect(isStorageKey(abcDigest)).toBe(true);
		expect(isStorageKey('g'.repeat(64))).toBe(false);
		expect(isStorageKey(42)).toBe(false);
	});
});
