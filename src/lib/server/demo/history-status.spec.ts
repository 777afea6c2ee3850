import { beforeAll, describe, expect, it } from 'vitest';
import { seedDemo } from '$lib/server/demo/seed';
import * as library from '$lib/server/flows/queries';
import { historySize } from '$lib/server/insights/demo-history';
import { fillHistory, historyStatus, stopHistory } from './history-status';

// The background fill of a demo's first start, on a real in-memory PGlite: it reports progress,
// ends "done" with the runs written, and a stop ends it after the batch under way.
beforeAll(async () => {
	await seedDemo();
	await library.importFromFiles();
});

describe('the demo history fill', () => {
	it('reports progress while it runs and is done with every run written', async () => {
		const lines: string[] = [];
		const running = fillHistory(60, (l) => lines.push(l));
		expect(historyStatus()).toMatchObject({ state: 'filling', total: 60 });
		const end = await running;
		expect(end).toMatchObject({ state: 'done', total: 60 });
		expect(await historySize()).toBe(60);
		expect(lines.some((l) => /history 25\/60 runs/.test(l))).toBe(true);
		expect(lines.at(-1)).toMatch(/history complete: 60 runs/);
	});

	it('stops after the batch under way when the app stops', async () => {
		const before = await historySize();
		const running = fillHistory(200, () => {});
		await stopHistory(running);
		const status = historyStatus();
		expect(status.state).toBe('failed');
		expect(status.state === 'failed' && status.message).toMatch(/stopped at 25 of 200 runs/);
		expect(await historySize()).toBe(before + 25);
	});
});
