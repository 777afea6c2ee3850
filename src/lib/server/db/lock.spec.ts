import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { DataDirInUseError, lockDataDir, releaseLock } from './lock';

describe('data folder lock', () => {
	const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'tm-lock-'));

	it('refuses a folder that a live process holds, naming the pid', () => {
		const lock = path.join(dir, 'live.lock');
		fs.writeFileSync(lock, String(process.ppid)); // the parent process is alive
		expect(() => lockDataDir(lock)).toThrow(DataDirInUseError);
		expect(() => lockDataDir(lock)).toThrow(new RegExp(`pid ${process.ppid}`));
	});

	it('takes over a stale lock and releases it', () => {
		const lock = path.join(dir, 'stale.lock');
		fs.writeFileSync(lock, '999999999');
		lockDataDir(lock);
		expect(fs.readFileSync(lock, 'utf8')).toBe(String(process.pid));
		releaseLock(lock);
		expect(fs.existsSync(lock)).toBe(false);
	});
});
