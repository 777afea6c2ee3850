/**
 * `npm run restore -- <file> [--data-dir DIR]`: restores a backup into an EMPTY data folder (DIR,
 * default DATA_DIR, default ./data) — and, for a pg_dump backup, into the empty database at
 * DATABASE_URL — after checking its manifest and checksums. Never writes over existing data.
 */
import { parseArgs } from 'node:util';
import { runWithServerModules } from './server-modules';

const { values, positionals } = parseArgs({
	allowPositionals: true,
	options: { 'data-dir': { type: 'string' }, help: { type: 'boolean', default: false } }
});
if (values.help || positionals.length !== 1) {
	console.log(`Usage: npm run restore -- <backup file> [--data-dir DIR]
Restores into DIR (default DATA_DIR, default ./data), which must be empty or absent.
A backup made with pg_dump goes into the empty PostgreSQL database at DATABASE_URL.`);
	process.exit(values.help ? 0 : 2);
}
process.env.DATA_DIR ||= 'data';

await runWithServerModules(async (load) => {
	const cli = await load('/src/lib/server/backup/cli.ts');
	try {
		return await cli.restoreCommand({ file: positionals[0], dataDir: values['data-dir'] });
	} catch (e) {
		if (
			e instanceof Error &&
			(e.constructor.name === 'BackupRefused' || e.constructor.name === 'DataDirInUseError')
		) {
			console.error(`Refused: ${e.message}`);
			return 2;
		}
		console.error(`The restore failed: ${(e as Error).message}`);
		return 1;
	}
});
