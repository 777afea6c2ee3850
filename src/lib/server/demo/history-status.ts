/**
 * The demo's invented history as it fills in the background on a first start (startup.ts):
 * Today and Insights show a notice while it runs. One per process, on globalThis so Vite's HMR
 * keeps it.
 */
import { generateHistory } from '$lib/server/insights/demo-history';
import { warmUp } from '$lib/server/insights/queries';

import type { HistoryStatus } from '$lib/insights/history';
import { unlessRunningElsewhere } from '$lib/server/db';

export type { HistoryStatus };

const g = globalThis as unknown as { __tidemarkHistory?: HistoryStatus; __tidemarkHistoryStop?: boolean };

class Stopped extends Error {}

export function historyStatus(): HistoryStatus {
	return g.__tidemarkHistory ?? { state: 'idle' };
}

/** A year of demo history by default: about 5,000 runs, as `npm run demo:history` suggests. */
export const DEFAULT_HISTORY_RUNS = 5000;

/**
 * Writes `runs` invented runs in small batches, yielding between them so the server keeps
 * answering, logging progress to the console. Resolves when done (or failed: logged, not thrown).
 * `stopHistory()` (on shutdown) ends it after the batch under way; the runs written so far stay.
 */
export async function fillHistory(runs: number, log = console.log): Promise<HistoryStatus> {
	g.__tidemarkHistoryStop = false;
	const startedAt = Date.now();
	g.__tidemarkHistory = { state: 'filling', done: 0, total: runs, startedAt };
	log(`[demo] filling a year of invented history in the background: ${runs} runs…`);
	let lastLog = 0;
	try {
		await generateHistory({
			runs,
			// Small batches and a pause between them: PGlite runs one statement at a time on the main
			// thread, so a request waits for the batch under way (bench/first-start.bench.mjs).
			batch: 25,
			pauseMs: 10,
			onProgress: (done, total) => {
				if (g.__tidemarkHistoryStop && done < total) throw new Stopped(`stopped at ${done} of ${total} runs`);
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
		if (e instanceof Stopped) log(`[demo] history ${message}: the app is stopping.`);
		else console.error('[demo] the invented history could not be written:', e);
	}
	return historyStatus();
}

/** Asks a running fill to stop after its current batch, and waits for it. */
export async function stopHistory(running: Promise<unknown> | null) {
	g.__tidemarkHistoryStop = true;
	await running;
}

let running: { timer: ReturnType<typeof setTimeout>; fill: Promise<unknown> | null } | null = null;

/**
 * Start-up step, for a demo that started with no run history. `runs` (TIDEMARK_DEMO_HISTORY): unset
 * fills a year in the background once the server listens; 0 skips it; N writes N runs now, before
 * the server listens (the browser tests).
 */
export async function startDemoHistory(runs: number | undefined) {
	if (runs === 0) {
		console.log('[demo] TIDEMARK_DEMO_HISTORY=0: no invented history (`npm run demo:history` adds it).');
		return;
	}
	if (runs) {
		await generateHistory({ runs, seed: 6, extraTechnicians: false });
		return;
	}
	// adapter-node listens as soon as startup() returns; the fill starts just after, in one process:
	// another sharing the PostgreSQL server skips it while the fill runs.
	const fill = () => unlessRunningElsewhere('demo history', () => fillHistory(DEFAULT_HISTORY_RUNS));
	const state: NonNullable<typeof running> = {
		timer: setTimeout(() => (state.fill = fill()), 200),
		fill: null
	};
	running = state;
}

/** Shutdown step: a fill not yet begun never starts; one under way stops after its batch. */
export async function stopDemoHistory() {
	const state = running;
	running = null;
	if (!state) return;
	clearTimeout(state.timer);
	await stopHistory(state.fill);
}
