/**
 * The demo's invented history as it fills in the background on a first start (startup-tasks.ts):
 * Today and Insights show a notice while it runs. One per process, on globalThis so Vite's HMR
 * keeps it.
 */
import { generateHistory } from '$lib/server/insights/demo-history';
import { warmUp } from '$lib/server/insights/queries';

import type { HistoryStatus } from '$lib/insights/history';

export type { HistoryStatus };

const g = globalThis as unknown as { __tidemarkHistory?: HistoryStatus };

export function historyStatus(): HistoryStatus {
	return g.__tidemarkHistory ?? { state: 'idle' };
}

/** A year of demo history by default: about 5,000 runs, as `npm run demo:history` suggests. */
export const DEFAULT_HISTORY_RUNS = 5000;

/**
 * Writes `runs` invented runs in small batches, yielding between them so the server keeps
 * answering, logging progress to the console. Resolves when done (or failed: logged, not thrown).
 */
export async function fillHistory(runs: number, log = console.log): Promise<HistoryStatus> {
	const startedAt = Date.now();
	g.__tidemarkHistory = { state: 'filling', done: 0, total: runs, startedAt };
	log(`[demo] filling a year of invented history in the background: ${runs} runs…`);
	let lastLog = 0;
	try {
		await generateHistory({
			runs,
			batch: 100,
			onProgress: (done, total) => {
				g.__tidemarkHistory = { state: 'filling', done, total, startedAt };
				const pct = Math.floor((done / total) * 10);
				if (pct > lastLog || done === total) {
					lastLog = pct;
					log(`[demo] history ${done}/${total} runs (${((Date.now() - startedAt) / 1000).toFixed(1)} s)`);
				}
			}
		});
		const seconds = (Date.now() - startedAt) / 1000;
		g.__tidemarkHistory = { state: 'done', total: runs, seconds };
		log(`[demo] history complete: ${runs} runs in ${seconds.toFixed(1)} s`);
		warmUp();
	} catch (e) {
		const message = e instanceof Error ? e.message : String(e);
		g.__tidemarkHistory = { state: 'failed', message };
		console.error('[demo] the invented history could not be written:', e);
	}
	return historyStatus();
}
