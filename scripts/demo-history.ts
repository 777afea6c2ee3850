/**
 * `npm run demo:history -- --runs 5000`: fills the demo database (DATA_DIR, default ./data) with a
 * year of invented runs for the insights. Refuses while the app has the data folder open.
 *
 * The server code uses Vite features ($lib, embedded migrations), so it is loaded through Vite's
 * SSR module loader rather than imported directly.
 */
import { parseArgs } from 'node:util';
import { createServer } from 'vite';

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

const vite = await createServer({
	appType: 'custom',
	logLevel: 'error',
	server: { middlewareMode: true, hmr: false, watch: null }
});
let code = 0;
try {
	const tasks = await vite.ssrLoadModule('/src/lib/server/insights/demo-setup.ts');
	try {
		await tasks.prepareDemo();
	} catch (e) {
		// Matched by name: the error class comes from Vite's module graph, not this file's.
		if (e instanceof Error && e.constructor.name === 'DataDirInUseError') {
			console.error(`${e.message}\nStop the app (Ctrl+C in its terminal), then run this again.`);
			code = 1;
		} else throw e;
	}
	if (code === 0) {
		const started = Date.now();
		let last = 0;
		const result = await tasks.generateHistory({
			runs,
			seed: values.seed ? Number(values.seed) : undefined,
			onProgress: (done: number, total: number) => {
				if (done === total || Date.now() - last > 1000) {
					last = Date.now();
					const pct = Math.round((done / total) * 100);
					console.log(
						`[history] ${done.toLocaleString('en')} / ${total.toLocaleString('en')} runs (${pct} %)`
					);
				}
			}
		});
		console.log(
			`[history] wrote ${result.runs.toLocaleString('en')} runs and ${result.steps.toLocaleString('en')} answered steps in ${((Date.now() - started) / 1000).toFixed(1)} s to ${process.env.DATA_DIR}. Start the app and open Insights as the lead.`
		);
	}
	if (code === 0) await tasks.close();
} catch (e) {
	console.error(e);
	code = 1;
} finally {
	await vite.close();
}
process.exit(code);
