/**
 * The insights read side: brings the process's copy of the facts up to date, then answers from it.
 * Every function here is on the request path and stays in single-digit milliseconds at 100,000
 * runs (bench/insights.bench.ts); the only database work is the catch-up in store.ts.
 */
import { getDb } from '$lib/server/db';
import { filterQuery, type FilterValues } from '$lib/insights/types';
import * as aggregate from './aggregate';
import { factStore, labels } from './store';

async function ready() {
	const db = await getDb();
	const store = factStore();
	const [, names] = await Promise.all([store.sync(db), labels(db)]);
	return { facts: store.facts(), store, labels: names };
}

/**
 * Answers are kept until a fact arrives (the store's generation moves) or the names change: a lead
 * reloading the dashboard, or several leads, cost one computation per change of the history, not
 * one per request. Scanning 100,000 facts takes tens of milliseconds on a busy 2-core machine.
 */
const answers = new Map<string, { generation: number; labels: unknown; value: unknown }>();
/** Forgets the computed answers (caches.ts). */
export function forgetAnswers() {
	answers.clear();
}
async function memo<T>(name: string, f: FilterValues, compute: (r: Awaited<ReturnType<typeof ready>>) => T) {
	const r = await ready();
	const key = `${name}?${filterQuery(f)}`;
	const hit = answers.get(key);
	if (hit && hit.generation === r.store.generation && hit.labels === r.labels) return hit.value as T;
	const value = compute(r);
	if (answers.size > 500) answers.clear();
	answers.set(key, { generation: r.store.generation, labels: r.labels, value });
	return value;
}

export async function verdicts(f: FilterValues, byVersion?: boolean) {
	return memo(`verdicts${byVersion ?? ''}`, f, ({ facts, labels }) =>
		aggregate.verdicts(facts, f, labels, byVersion)
	);
}

export async function trend(f: FilterValues) {
	return memo('trend', f, ({ facts }) => aggregate.trend(facts, f));
}

export async function durations(f: FilterValues) {
	return memo('durations', f, ({ facts, labels }) => aggregate.durations(facts, f, labels));
}

export async function abandoned(f: FilterValues) {
	return memo('abandoned', f, ({ facts, labels }) => aggregate.abandoned(facts, f, labels));
}

export async function accuracy(f: FilterValues) {
	return memo('accuracy', f, ({ facts, labels }) => aggregate.accuracy(facts, f, labels));
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
