/**
 * `npm run db:copy -- <postgres-url> [--batch N]`: copies the embedded database in DATA_DIR
 * (default ./data) into a new, empty PostgreSQL database, for the move to a PostgreSQL server.
 * Stop the app first (the data folder is locked to it). Both databases are migrated by this code
 * first; every table is copied in foreign-key order in one transaction; row counts are compared.
 * Photos are not in the database: they stay in DATA_DIR/uploads (or the S3 bucket).
 */
import fs from 'node:fs';
import path from 'node:path';
import { parseArgs } from 'node:util';
import { dataDirInUse, runWithServerModules } from './server-modules';

const usage =
	'Usage: npm run db:copy -- <postgres-url> [--batch N]\n' +
	'Copies the embedded database in DATA_DIR (default ./data) into an empty PostgreSQL database.\n' +
	'Stop the app first; create the target with createdb; then start the app with DATABASE_URL set.';

let parsed;
try {
	parsed = parseArgs({
		allowPositionals: true,
		options: { batch: { type: 'string' }, help: { type: 'boolean', short: 'h', default: false } }
	});
} catch (e) {
	console.error(`${e instanceof Error ? e.message : String(e)}\n${usage}`);
	process.exit(2);
}
const { values, positionals } = parsed;
if (values.help) {
	console.log(usage);
	process.exit(0);
}
const target = positionals[0] ?? '';
if (positionals.length !== 1 || !/^postgres(ql)?:\/\//.test(target)) {
	console.error(usage);
	process.exit(2);
}
const batchRows = values.batch === undefined ? 500 : Number(values.batch);
if (!(Number.isInteger(batchRows) && batchRows >= 1 && batchRows <= 100_000)) {
	console.error(`--batch must be a whole number from 1 to 100000, not "${values.batch}".`);
	process.exit(2);
}
const dataDir = path.resolve(process.env.DATA_DIR || 'data');
if (!fs.existsSync(path.join(dataDir, 'pgdata'))) {
	console.error(`No embedded database in ${dataDir}/pgdata. Set DATA_DIR to the app's data folder.`);
	process.exit(2);
}
const shown = (() => {
	const u = new URL(target);
	if (u.password) u.password = '•••';
	return u.toString();
})();

await runWithServerModules(async (load) => {
	const db = await load('/src/lib/server/db/index.ts');
	const { copyDatabase } = await load('/src/lib/server/db/copy.ts');
	let code = 0;
	let closeSource: (() => Promise<void>) | null = null;
	let closeTarget: (() => Promise<void>) | null = null;
	try {
		// openDatabase() opens DATABASE_URL when set, else DATA_DIR: each side in turn.
		process.env.DATA_DIR = dataDir;
		delete process.env.DATABASE_URL;
		const source = await db.openDatabase();
		closeSource = source.close;
		process.env.DATABASE_URL = target;
		const into = await db.openDatabase();
		closeTarget = into.close;
		console.log(`[db:copy] ${dataDir}/pgdata → ${shown} (both migrated)`);
		const t0 = performance.now();
		const report: { table: string; source: number; target: number }[] = await copyDatabase(
			source.db,
			into.db,
			{ batchRows, log: (line: string) => console.log(`[db:copy] ${line}`) }
		);
		const width = Math.max(...report.map((r) => r.table.length));
		console.log('\n' + report.map((r) => `${r.table.padEnd(width)}  ${r.source} = ${r.target}`).join('\n'));
		const total = report.reduce((n, r) => n + r.target, 0);
		console.log(
			`\n[db:copy] ${total} rows in ${report.length} tables copied and counted in ${((performance.now() - t0) / 1000).toFixed(1)} s.` +
				`\nNext: start the app with DATABASE_URL=${shown} (keep DATA_DIR for the photos in DATA_DIR/uploads).`
		);
	} catch (e) {
		const busy = dataDirInUse(e);
		// Matched by name: the error classes come from Vite's module graph, not this file's.
		if (busy) console.error(busy);
		else if (e instanceof Error && e.constructor.name === 'CopyRefused')
			console.error(`[db:copy] ${e.message}`);
		else throw e;
		code = 1;
	} finally {
		await closeTarget?.();
		await closeSource?.();
	}
	return code;
});
