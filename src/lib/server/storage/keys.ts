import crypto from 'node:crypto';

/**
 * A content-addressed blob store: the key of a blob is the SHA-256 of its bytes in lower-case hex.
 * Equal bytes get equal keys, so a file uploaded twice is kept once, and a key can never name a
 * path (it is validated as 64 hex digits before any file-system call).
 */
export interface BlobStore {
	/** Stores the bytes (a no-op when a blob with the same content is already there). */
	put(bytes: Uint8Array): Promise<{ key: string; size: number; created: boolean }>;
	/** The bytes, or null when no blob has this key. */
	get(key: string): Promise<Uint8Array | null>;
	stat(key: string): Promise<{ size: number } | null>;
	/** True when a blob was removed. */
	delete(key: string): Promise<boolean>;
	/** Every stored key, in no particular order (for backups and checks, not for requests). */
	keys(): AsyncIterable<string>;
}

const keyPattern = /^[0-9a-f]{64}$/;

export function isStorageKey(key: unknown): key is string {
	return typeof key === 'string' && keyPattern.test(key);
}

/** Throws on anything but a well-formed key, so no caller can turn a key into a path outside the store. */
export function assertStorageKey(key: string) {
	if (!isStorageKey(key)) throw new TypeError('Not a storage key (64 lower-case hex digits expected).');
}

export function keyOf(bytes: Uint8Array) {
	return crypto.createHash('sha256').update(bytes).digest('hex');
}
