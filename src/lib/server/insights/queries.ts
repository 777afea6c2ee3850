/**
 * The insights read side: brings the process's copy of the facts up to date, then answers from it.
 * Every function here is on the request path and stays in single-digit milliseconds at 100,000
 * runs (bench/insights.bench.ts); the only database work is the catch-up in store.ts.
 */
import { getDb } from '$lib/server/db';
import type { FilterValues } from '$lib/insights/types';
import * as aggregate from './aggregate';
import { factStore, labels } from './store';

async function ready() {
	const db = await getDb();
	const store = factStore();
	const [, names] = await Promise.all([store.sync(db), labels(db)]);
	return { facts: store.facts(), store, labels: names };
}

export async function verdicts(f: FilterValues, byVersion?: boolean) {
	const { facts, labels } = await ready();
	return aggregate.verdicts(facts, f, labels, byVersion);
}

export async function trend(f: FilterValues) {
	const { facts } = await ready();
	return aggregate.trend(facts, f);
}

export async function durations(f: FilterValues) {
	const { facts, labels } = await ready();
	return aggregate.durations(facts, f, labels);
}

export async function abandoned(f: FilterValues) {
	const { facts, labels } = await ready();
	return aggregate.abandoned(facts, f, labels);
}

export async function accuracy(f: FilterValues) {
	const { facts, labels } = await ready();
	return aggregate.accuracy(facts, f, labels);
}

export async function options() {
	const { facts, labels } = await ready();
	return aggregate.options(facts, labels);
}

/** Past runs of a flow through one step; looks only at that flow's facts. */
export async function stepHistory(flowId: string, stepId: string) {
	const { store, labels } = await ready();
	const facts = store.byFlow.get(flowId)?.values() ?? [];
	return aggregate.stepHistory(facts, flowId, stepId, labels);
}

/** Starts filling the process's copy in the background (start-up), so the first lead waits less. */
export function warmUp() {
	void ready().catch((e) => console.error('[insights] warm-up failed:', e));
}
