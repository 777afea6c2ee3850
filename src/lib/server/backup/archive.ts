/**
 * The backup file: a gzipped tar (the `tar` package) of a staging folder — manifest.json first,
 * then database/… and photos/<key>. Reading one back extracts it into an empty work folder and
 * checks the manifest and every member's size and SHA-256 before anything else looks at it.
 */
import crypto from 'node:crypto';
import { createReadStream } from 'node:fs';
import fs from 'node:fs/promises';
import path from 'node:path';
import * as tar from 'tar';
import { MANIFEST, manifestSchema, type Manifest } from './manifest';

export class BackupRefused extends Error {}

export async function sha256File(file: string): Promise<string> {
	const hash = crypto.createHash('sha256');
	for await (const chunk of createReadStream(file)) hash.update(chunk as Buffer);
	return hash.digest('hex');
}

/** Every regular file under `dir`, as forward-slash paths relative to it, sorted. */
export async function filesUnder(dir: string): Promise<string[]> {
	const out: string[] = [];
	for (const e of await fs.readdir(dir, { recursive: true, withFileTypes: true })) {
		if (e.isFile()) out.push(path.relative(dir, path.join(e.parentPath, e.name)).split(path.sep).join('/'));
	}
	return out.sort();
}

export async function describeMembers(dir: string, paths: string[]): Promise<Manifest['members']> {
	const members: Manifest['members'] = [];
	for (const p of paths) {
		const file = path.join(dir, p);
		members.push({ path: p, size: (await fs.stat(file)).size, sha256: await sha256File(file) });
	}
	return members;
}

/** Writes `staging` (which must hold manifest.json) to `file`, via a partial file renamed into place. */
export async function pack(staging: string, file: string) {
	const partial = path.join(path.dirname(file), `.${path.basename(file)}.partial`);
	const rest = (await fs.readdir(staging)).filter((n) => n !== MANIFEST).sort();
	try {
		await tar.create({ gzip: true, file: partial, cwd: staging, portable: true }, [MANIFEST, ...rest]);
		await fs.rename(partial, file);
	} catch (e) {
		await fs.rm(partial, { force: true });
		throw e;
	}
}

/**
 * Extracts `file` into `work` (empty) and checks it: a manifest this code reads, exactly the members
 * it lists (regular files only, no paths outside the folder), each with its size and SHA-256.
 */
export async function unpackAndVerify(file: string, work: string): Promise<Manifest> {
	try {
		await fs.access(file);
	} catch {
		throw new BackupRefused(`No backup file at ${file}.`);
	}
	const odd: string[] = [];
	try {
		await tar.extract({
			file,
			cwd: work,
			strict: true,
			filter: (p, entry) => {
				const type = 'type' in entry ? entry.type : 'File';
				const ok = type === 'File' || type === 'Directory' || type === 'OldFile';
				if (!ok) odd.push(p);
				return ok;
			}
		});
	} catch (e) {
		throw new BackupRefused(`This is not a readable backup file (${(e as Error).message}).`);
	}
	if (odd.length)
		throw new BackupRefused(`The backup holds entries that are not plain files: ${odd.join(', ')}.`);
	let raw: unknown;
	try {
		raw = JSON.parse(await fs.readFile(path.join(work, MANIFEST), 'utf8'));
	} catch {
		throw new BackupRefused('The backup has no readable manifest.json: it is not a Tidemark backup.');
	}
	const parsed = manifestSchema.safeParse(raw);
	if (!parsed.success)
		throw new BackupRefused(
			`The backup's manifest is not one this version reads: ${parsed.error.issues[0]?.message}`
		);
	const manifest = parsed.data;
	const present = (await filesUnder(work)).filter((p) => p !== MANIFEST);
	const listed = new Set(manifest.members.map((m) => m.path));
	const extra = present.filter((p) => !listed.has(p));
	if (extra.length)
		throw new BackupRefused(`The backup holds files its manifest does not list: ${extra.join(', ')}.`);
	for (const m of manifest.members) {
		const f = path.join(work, m.path);
		const stat = await fs.stat(f).catch(() => null);
		if (!stat) throw new BackupRefused(`The backup lacks ${m.path}, which its manifest lists.`);
		const sum = await sha256File(f);
		if (stat.size !== m.size || sum !== m.sha256)
			throw new BackupRefused(
				`Checksum mismatch for ${m.path}: the manifest says ${m.sha256.slice(0, 12)}… (${m.size} bytes), ` +
					`the file is ${sum.slice(0, 12)}… (${stat.size} bytes). The backup is damaged; use another one.`
			);
	}
	if (!listed.has(manifest.database.member))
		throw new BackupRefused(
			`The manifest names ${manifest.database.member} as the database but does not list it.`
		);
	return manifest;
}
