/**
 * `npm run flows:export -- <flow-id> [--version N] [--out folder]`: writes a stored version (the
 * newest published one by default) as `flows/<flow-id>.flow.yaml`. Reads the database the app uses
 * (DATA_DIR, default ./data, or DATABASE_URL), so stop the app first when it runs on PGlite.
 *
 * The server code uses Vite features ($lib, embedded migrations), so it is loaded through Vite's
 * SSR module loader rather than imported directly.
 */
import { parseArgs } from 'node:util';
import { createServer } from 'vite';

const usage =
	'Usage: npm run flows:export -- <flow-id> [--version N] [--out folder]\n' +
	'Writes the version (default: the newest published) to flows/<flow-id>.flow.yaml.';

let parsed;
try {
	parsed = parseArgs({
		allowPositionals: true,
		options: {
			version: { type: 'string', short: 'v' },
			out: { type: 'string' },
			help: { type: 'boolean', short: 'h', default: false }
		}
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
if (positionals.length !== 1) {
	console.error(usage);
	process.exit(2);
}
const version = values.version === undefined ? undefined : Number(values.version);
if (version !== undefined && !(Number.isInteger(version) && version >= 1)) {
	console.error(`--version must be a whole number from 1, not "${values.version}".`);
	process.exit(2);
}
process.env.DATA_DIR ||= 'data';

const vite = await createServer({
	appType: 'custom',
	logLevel: 'error',
	server: { middlewareMode: true, hmr: false, ws: false, watch: null }
});
let code = 0;
try {
	const { exportVersion } = await vite.ssrLoadModule('/src/lib/server/flows/export.ts');
	const db = await vite.ssrLoadModule('/src/lib/server/db/index.ts');
	try {
		const done = await exportVersion(positionals[0], version, values.out);
		console.log(
			`[flows] wrote ${done.file}: ${done.flowId} version ${done.version}, checksum ${done.checksum.slice(0, 12)}`
		);
	} catch (e) {
		// Matched by name: the error classes come from Vite's module graph, not this file's.
		const name = e instanceof Error ? e.constructor.name : '';
		if (name === 'ExportError') console.error(`[flows] ${(e as Error).message}`);
		else if (name === 'DataDirInUseError')
			console.error(`${(e as Error).message}\nStop the app (Ctrl+C in its terminal), then run this again.`);
		else throw e;
		code = 1;
	}
	await db.closeDb();
} catch (e) {
	console.error(e);
	code = 1;
} finally {
	await vite.close();
}
process.exit(code);
