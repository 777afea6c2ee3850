/**
 * `npm run flows:export -- <flow-id> [--version N] [--out folder]`: writes a stored version (the
 * newest published one by default) as `flows/<flow-id>.flow.yaml`. Reads the database the app uses
 * (DATA_DIR, default ./data, or DATABASE_URL), so stop the app first when it runs on PGlite.
 */
import { parseArgs } from 'node:util';
import { dataDirInUse, runWithServerModules } from './server-modules';

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

await runWithServerModules(async (load) => {
	const { exportVersion } = await load('/src/lib/server/flows/export.ts');
	const db = await load('/src/lib/server/db/index.ts');
	let code = 0;
	try {
		const done = await exportVersion(positionals[0], version, values.out);
		console.log(
			`[flows] wrote ${done.file}: ${done.flowId} version ${done.version}, checksum ${done.checksum.slice(0, 12)}`
		);
	} catch (e) {
		// Matched by name: the error classes come from Vite's module graph, not this file's.
		const busy = dataDirInUse(e);
		if (busy) console.error(busy);
		else if (e instanceof Error && e.name === 'RuleError') console.error(`[flows] ${e.message}`);
		else throw e;
		code = 1;
	}
	await db.closeDb();
	return code;
});
