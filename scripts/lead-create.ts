/**
 * `npm run lead:create -- --email lead@shop.example --name "Full Name"`: the shop's first lead, on a
 * fresh production database. Prints a temporary password once; the lead changes it at the first
 * sign-in. Refused when an active lead exists. Uses DATABASE_URL, else DATA_DIR (default ./data):
 * on the embedded database stop the app first (the data folder is locked to it).
 */
import { parseArgs } from 'node:util';
import { dataDirInUse, runWithServerModules } from './server-modules';

const usage = 'Usage: npm run lead:create -- --email <address> --name "<full name>"';
let values;
try {
	({ values } = parseArgs({
		options: { email: { type: 'string' }, name: { type: 'string' }, help: { type: 'boolean', short: 'h' } }
	}));
} catch (e) {
	console.error(`${e instanceof Error ? e.message : String(e)}\n${usage}`);
	process.exit(2);
}
if (values.help) {
	console.log(usage);
	process.exit(0);
}
if (!values.email || !values.name) {
	console.error(usage);
	process.exit(2);
}
process.env.DATA_DIR ||= 'data';

await runWithServerModules(async (load) => {
	const db = await load('/src/lib/server/db/index.ts');
	const { createFirstLead } = await load('/src/lib/server/staff/first-lead.ts');
	let code = 0;
	try {
		const { lead, password } = await createFirstLead({ name: values.name, email: values.email });
		console.log(
			`[staff] lead ${lead.name} <${lead.email}> created.\n` +
				`Temporary password (shown once): ${password}\n` +
				'Sign in with it; the app asks for a new password straight away.'
		);
	} catch (e) {
		// Matched by name: the error classes come from Vite's module graph, not this file's.
		const busy = dataDirInUse(e);
		if (busy) console.error(busy);
		else if (e instanceof Error && ['FirstLeadRefused', 'StaffRuleError'].includes(e.constructor.name))
			console.error(`[staff] ${e.message}`);
		else throw e;
		code = 1;
	}
	await db.closeDb();
	return code;
});
