import { openDB, type DBSchema } from 'idb';
import type { Base, Entry, OutboxStore } from './outbox';

export const byOrder = (a: Entry, b: Entry) => a.order - b.order || a.id.localeCompare(b.id);

/** The outbox in memory: where there is no IndexedDB, and in tests. */
export function memoryStore(): OutboxStore {
	const entries = new Map<string, Entry>();
	const bases = new Map<string, Base>();
	return {
		list: async (runId) => [...entries.values()].filter((e) => e.runId === runId).sort(byOrder),
		put: async (e) => void entries.set(e.id, e),
		remove: async (id) => void entries.delete(id),
		all: async () => [...entries.values()].sort(byOrder),
		getBase: async (runId) => bases.get(runId),
		putBase: async (b) => void bases.set(b.runId, b)
	};
}

interface OutboxDb extends DBSchema {
	entries: { key: string; value: Entry; indexes: { runId: string } };
	bases: { key: string; value: Base };
}

const open = () =>
	openDB<OutboxDb>('tidemark-outbox', 1, {
		upgrade(db) {
			const entries = db.createObjectStore('entries', { keyPath: 'id' });
			entries.createIndex('runId', 'runId');
			db.createObjectStore('bases', { keyPath: 'runId' });
		}
	});

/** The outbox in IndexedDB (photos as Blobs, which it stores natively); in memory without it. */
export async function openStore(): Promise<OutboxStore> {
	if (typeof indexedDB === 'undefined') return memoryStore();
	const db = await open();
	return {
		list: async (runId) => (await db.getAllFromIndex('entries', 'runId', runId)).sort(byOrder),
		put: async (e) => void (await db.put('entries', e)),
		remove: async (id) => db.delete('entries', id),
		all: async () => (await db.getAll('entries')).sort(byOrder),
		getBase: (runId) => db.get('bases', runId),
		putBase: async (b) => void (await db.put('bases', b))
	};
}

let shared: Promise<OutboxStore> | undefined;
/**
 * One store per page; a failure to open (private mode, quota) falls back to memory. Without
 * IndexedDB each caller gets its own memory store: it lives as long as the screen that holds it.
 */
export function getStore(): Promise<OutboxStore> {
	if (typeof indexedDB === 'undefined') return Promise.resolve(memoryStore());
	shared ??= openStore().catch(() => memoryStore());
	return shared;
}

/** Forgets the confirmed copies of runs (sign-out on a shared tablet); waiting entries stay. */
export async function forgetBases() {
	if (typeof indexedDB === 'undefined') return;
	await (await open()).clear('bases');
}
