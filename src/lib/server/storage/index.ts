import path from 'node:path';
import { dataDir } from '$lib/server/db';
import { LocalStore } from './local';
import { MemoryStore } from './memory';
import { S3Store } from './s3';
import { describeStorage, s3Settings } from './config';
import type { BlobStore } from './keys';

export * from './keys';
export { describeStorage, s3Settings, setFakeS3, StorageConfigError, type S3Settings } from './config';

// One store per configuration per process (on globalThis so Vite's HMR does not make a second).
// It holds no data of its own: the blobs live in the folder or the bucket, so any number of
// processes may share them.
const g = globalThis as unknown as { __tidemarkStore?: { id: string; store: BlobStore } };

/**
 * The object store when S3 is configured (or the local fake S3 is running); otherwise
 * DATA_DIR/uploads, or memory under DATA_DIR=memory:// (tests).
 */
export function getStore(): BlobStore {
	const s3 = s3Settings();
	const dir = dataDir();
	const id = s3 ? JSON.stringify(s3) : dir.startsWith('memory://') ? 'memory' : path.resolve(dir, 'uploads');
	if (g.__tidemarkStore?.id !== id) {
		const store = s3 ? S3Store.from(s3) : id === 'memory' ? new MemoryStore() : new LocalStore(id);
		g.__tidemarkStore = { id, store };
	}
	return g.__tidemarkStore.store;
}

/**
 * Start-up step: says where photos go and, for an object store, checks the bucket answers to these
 * keys, so a wrong setting shows in the log at start rather than on the first photo.
 */
export async function startStorage() {
	const store = getStore();
	const s3 = s3Settings();
	const where = s3
		? describeStorage(s3)
		: store instanceof LocalStore
			? `local folder ${store.root}`
			: 'memory (nothing kept)';
	console.log(`[photos] stored in the ${where}`);
	if (store instanceof S3Store) await store.check();
}

export { LocalStore, MemoryStore, S3Store };
