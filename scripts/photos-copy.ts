/**
 * `npm run photos:copy`: copies the photos in DATA_DIR/uploads (default ./data/uploads) into the
 * object store named by the S3_ settings (S3_BUCKET, S3_ENDPOINT, …), for a shop moving its photos
 * to S3. Safe to run again: what is already in the bucket is left alone. Stop the app first, so no
 * photo is added to the folder after it was read; then start it with the S3_ settings.
 */
import fs from 'node:fs';
import path from 'node:path';
import { runWithServerModules } from './server-modules';

if (process.argv.slice(2).some((a) => a === '-h' || a === '--help')) {
	console.log('Usage: S3_BUCKET=… [S3_ENDPOINT=… S3_ACCESS_KEY_ID=… …] npm run photos:copy');
	process.exit(0);
}
const uploads = path.resolve(process.env.DATA_DIR || 'data', 'uploads');
if (!fs.existsSync(uploads)) {
	console.error(`No photos folder at ${uploads}. Set DATA_DIR to the app's data folder.`);
	process.exit(2);
}
if (!process.env.S3_BUCKET?.trim()) {
	console.error('Set S3_BUCKET (and S3_ENDPOINT, S3_REGION, the keys) to the object store to copy into.');
	process.exit(2);
}

await runWithServerModules(async (load) => {
	const storage = await load('/src/lib/server/storage/index.ts');
	const { copyBlobs } = await load('/src/lib/server/storage/copy.ts');
	let settings;
	try {
		settings = storage.s3Settings();
	} catch (e) {
		console.error(`[photos:copy] ${e instanceof Error ? e.message : String(e)}`);
		return 2;
	}
	const target = storage.S3Store.from(settings);
	await target.check();
	console.log(`[photos:copy] ${uploads} → ${storage.describeStorage(settings)}`);
	const t0 = performance.now();
	const done = await copyBlobs(new storage.LocalStore(uploads), target, (line: string) =>
		console.log(`[photos:copy] ${line}`)
	);
	console.log(
		`[photos:copy] ${done.copied} files copied (${(done.bytes / 1e6).toFixed(1)} MB), ${done.present} already there, ` +
			`in ${((performance.now() - t0) / 1000).toFixed(1)} s. Each file was checked in the bucket by its key and size.`
	);
	return 0;
});
