import path from 'node:path';
import { dataDir } from '$lib/server/db';
import { LocalStore } from './local';
import { MemoryStore } from './memory';
import type { BlobStore } from './keys';

export * from './keys';

// One store per process, like the database (kept on globalThis so Vite's HMR does not make a second).
const g = globalThis as unknown as { __tidemarkStore?: BlobStore };

/** DATA_DIR=memory:// (tests) keeps blobs in memory; otherwise they live in DATA_DIR/uploads. */
export function getStore(): BlobStore {
	const dir = dataDir();
	g.__tidemarkStore ??= dir.startsWith('memory://')
		? new MemoryStore()
		: new LocalStore(path.resolve(dir, 'uploads'));
	return g.__tidemarkStore;
}

export { LocalStore, MemoryStore };
