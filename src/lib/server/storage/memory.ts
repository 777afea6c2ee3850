import { assertStorageKey, keyOf, type BlobStore } from './keys';

/** For tests (DATA_DIR=memory://): same contract as the disk store, nothing touches the disk. */
export class MemoryStore implements BlobStore {
	private blobs = new Map<string, Uint8Array>();

	async put(bytes: Uint8Array) {
		const key = keyOf(bytes);
		const created = !this.blobs.has(key);
		// A copy, so a caller reusing its buffer cannot change what was stored.
		if (created) this.blobs.set(key, Uint8Array.from(bytes));
		return { key, size: bytes.byteLength, created };
	}

	async get(key: string) {
		assertStorageKey(key);
		const blob = this.blobs.get(key);
		return blob ? Uint8Array.from(blob) : null;
	}

	async stat(key: string) {
		assertStorageKey(key);
		const blob = this.blobs.get(key);
		return blob ? { size: blob.byteLength } : null;
	}

	async delete(key: string) {
		assertStorageKey(key);
		return this.blobs.delete(key);
	}

	async *keys() {
		yield* [...this.blobs.keys()];
	}

	/** How many blobs are held; for tests. */
	get size() {
		return this.blobs.size;
	}
}
