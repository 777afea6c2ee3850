import fs from 'node:fs';

export class DataDirInUseError extends Error {}

/**
 * PGlite takes no lock of its own, and two processes writing one data folder destroy it.
 * We keep a pid file beside the folder: a live owner stops us, a stale one is taken over.
 */
export function lockDataDir(lockFile: string) {
	try {
		fs.writeFileSync(lockFile, String(process.pid), { flag: 'wx' });
	} catch (e) {
		if ((e as NodeJS.ErrnoException).code !== 'EEXIST') throw e;
		const pid = Number(fs.readFileSync(lockFile, 'utf8'));
		if (pid !== process.pid && isAlive(pid)) {
			throw new DataDirInUseError(
				`The data folder is already open in another Tidemark process (pid ${pid}). ` +
					`Stop that process first, or point DATA_DIR at another folder. (Lock file: ${lockFile})`
			);
		}
		fs.writeFileSync(lockFile, String(process.pid));
	}
	process.once('exit', () => releaseLock(lockFile));
}

export function releaseLock(lockFile: string) {
	try {
		if (fs.readFileSync(lockFile, 'utf8') === String(process.pid)) fs.unlinkSync(lockFile);
	} catch {
		// already gone
	}
}

function isAlive(pid: number) {
	if (!Number.isInteger(pid) || pid <= 0) return false;
	try {
		process.kill(pid, 0);
		return true;
	} catch (err) {
		return (err as NodeJS.ErrnoException).code === 'EPERM';
	}
}
