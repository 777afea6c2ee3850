import crypto from 'node:crypto';
import fs from 'node:fs/promises';
import path from 'node:path';
import { assertStorageKey, isStorageKey, keyOf, type BlobStore } from './keys';

const isMissing = (e: unknown) => (e as NodeJS.ErrnoException)?.code === 'ENOENT';

/**
 * Blobs on disk under `root` (DATA_DIR/uploads), sharded by the first two pairs of hex digits so no
 * folder grows huge: `root/ab/cd/abcd…` (64 hex digits). A write goes to `root/tmp/` first and is
 * renamed into place, so a reader never sees half a file and a crash leaves only a temp file.
 */
export class LocalStore implements BlobStore {
	constructor(readonly root: string) {}

	pathOf(key: string) {
		assertStorageKey(key);
		return path.join(this.root, key.slice(0, 2), key.slice(2, 4), key);
	}

	async put(bytes: Uint8Array) {
		const key = keyOf(bytes);
		const target = this.pathOf(key);
		if (await this.stat(key)) return { key, size: bytes.byteLength, created: false };
		const tmpDir = path.join(this.root, 'tmp');
		await fs.mkdir(tmpDir, { recursive: true });
		await fs.mkdir(path.dirname(target), { recursive: true });
		const tmp = path.join(tmpDir, `${key}.${crypto.randomUUID()}`);
		try {
			await fs.writeFile(tmp, bytes, { flag: 'wx', mode: 0o640 });
			// rename() is atomic within one file system (tmp/ sits inside root for that reason); a
			// concurrent put of the same bytes renames an identical file over it, which is harmless.
			await fs.rename(tmp, target);
		} catch (e) {
			await fs.rm(tmp, { force: true });
			throw e;
		}
		return { key, size: bytes.byteLength, created: true };
	}

	async get(key: string) {
		try {
			return new Uint8Array(await fs.readFile(this.pathOf(key)));
		} catch (e) {
			if (isMissing(e)) return null;
			throw e;
		}
	}

	async stat(key: string) {
		try {
			const s = await fs.stat(this.pathOf(key));
			return { size: s.size };
		} catch (e) {
			if (isMissing(e)) return null;
			throw e;
		}
	}

	async *keys() {
		let entries;
		try {
			entries = await fs.readdir(this.root, { recursive: true, withFileTypes: true });
		} catch (e) {
			if (isMissing(e)) return;
			throw e;
		}
		for (const e of entries) {
			// Only files at their sharded place count (tmp/ holds unfinished writes).
			if (e.isFile() && isStorageKey(e.name) && path.join(e.parentPath, e.name) === this.pathOf(e.name))
				yield e.name;
		}
	}

	async delete(key: string) {
		try {
			await fs.unlink(this.pathOf(key));
			return true;
		} catch (e) {
			if (isMissing(e)) return false;
			throw e;
		}
	}
}
