/**
 * `npm run backup [-- --out DIR] [--url http://host:port]`: one file holding the database and the
 * photos, with a manifest (src/lib/server/backup/cli.ts says which way it takes).
 */
import { parseArgs } from 'node:util';
import { runWithServerModules } from './server-modules';

const { values } = parseArgs({
	options: { out: { type: 'string' }, url: { type: 'string' }, help: { type: 'boolean', default: false } }
});
if (values.help) {
	console.log(`Usage: npm run backup [-- --out DIR] [--url URL]
Writes tidemark-backup-<time>.tar.gz into DIR (default DATA_DIR/backups).
  DATABASE_URL set: pg_dump of that server, photos from DATA_DIR.
  App running on DATA_DIR: asks it (POST URL/api/backups, default PUBLIC_BASE_URL/ORIGIN/localhost:PORT) with BACKUP_TOKEN.
  Otherwise: reads the stopped app's DATA_DIR (default ./data) directly.`);
	process.exit(0);
}
process.env.DATA_DIR ||= 'data';

await runWithServerModules(async (load) => {
	const cli = await load('/src/lib/server/backup/cli.ts');
	try {
		return await cli.backupCommand({ out: values.out, url: values.url });
	} catch (e) {
		if (
			e instanceof Error &&
			(e.constructor.name === 'BackupRefused' || e.constructor.name === 'DataDirInUseError')
		) {
			console.error(e.message);
			return 2;
		}
		console.error(`The backup failed: ${(e as Error).message}`);
		return 1;
	}
});
