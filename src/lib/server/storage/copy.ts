import type { BlobStore } from './keys';

/**
 * Copies every blob of one store into another (the local folder into an object store, when a shop
 * moves its photos to S3). Each blob is read, written and read back by its key: a blob already in
 * the target is counted and left alone, so the copy can be run again after an interruption.
 */
export async function copyBlobs(
	from: BlobStore,
	to: BlobStore,
	log: (line: string) => void = () => {}
): Promise<{ copied: number; present: number; bytes: number }> {
	const done = { copied: 0, present: 0, bytes: 0 };
	for await (const key of from.keys()) {
		const bytes = await from.get(key);
		if (!bytes) continue; // removed meanwhile
		const { key: stored, created } = await to.put(bytes);
		if (stored !== key) throw new Error(`Blob ${key} in the source does not match its key.`);
		const back = await to.stat(key);
		if (back?.size !== bytes.byteLength) throw new Error(`Blob ${key} did not arrive whole in the target.`);
		if (created) {
			done.copied++;
			done.bytes += bytes.byteLength;
		} else done.present++;
		if ((done.copied + done.present) % 200 === 0) log(`${done.copied + done.present} files…`);
	}
	return done;
}
