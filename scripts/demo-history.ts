/**
 * `npm run demo:history -- --runs 5000`: fills the demo database (DATA_DIR, default ./data) with a
 * year of invented runs for the insights. Refuses while the app has the data folder open.
 */
import { parseArgs } from 'node:util';
import { dataDirInUse, runWithServerModules } from './server-modules';

const { values } = parseArgs({
	options: {
		runs: { type: 'string', default: '5000' },
		seed: { type: 'string' },
		help: { type: 'boolean', default: false }
	}
});
if (values.help) {
	console.log(
		'Usage: npm run demo:history -- [--runs 5000] [--seed N]\nFills DATA_DIR (default ./data) with invented history.'
	);
	process.exit(0);
}
const runs = Number(values.runs);
if (!Number.isInteger(runs) || runs < 1 || runs > 1_000_000) {
	console.error('--runs must be a whole number from 1 to 1,000,000.');
	process.exit(2);
}
process.env.DATA_DIR ||= 'data';
process.env.TIDEMARK_DEMO = '1';

await runWithServerModules(async (load) => {
	const tasks = await load('/src/lib/server/insights/demo-setup.ts');
	try {
		await tasks.prepareDemo();
	} catch (e) {
		const busy = dataDirInUse(e);
		if (!busy) throw e;
		console.error(busy);
		return 1;
	}
	const started = Date.now();
	let last = 0;
	const result = await tasks.generateHistory({
		runs,
		seed: values.seed ? Number(values.seed) : undefined,
		onProgress: (done: number, total: number) => {
			if (done === total || Date.now() - last > 1000) {
				last = Date.now();
				const pct = Math.round((done / total) * 100);
				console.log(`[history] ${done.toLocaleString('en')} / ${total.toLocaleString('en')} runs (${pct} %)`);
			}
		}
	});
	console.log(
		`[history] wrote ${result.runs.toLocaleString('en')} runs and ${result.steps.toLocaleString('en')} answered steps in ${((Date.now() - started) / 1000).toFixed(1)} s to ${process.env.DATA_DIR}. Start the app and open Insights as the lead.`
	);
	await tasks.close();
	return 0;
});
