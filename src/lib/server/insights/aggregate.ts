// Over 300 lines on purpose: one pure aggregation per Insights panel, checked against fixtures.
/**
 * The insights' arithmetic over facts: pure functions of (facts, filters, labels), so that each can
 * be checked against hand-computed fixtures. Intervals are Wilson 95 % (trade-reference §3),
 * medians and p90 are type-7 percentiles (domain/stats).
 */
import { median, percentile, wilsonInterval } from '$lib/domain/stats';
import { expectedCost, orderByProbabilityOverCost } from '$lib/domain/ordering';
import type {
	AbandonedResponse,
	AccuracyResponse,
	DurationsResponse,
	FilterOptions,
	FilterValues,
	StepHistory,
	TrendResponse,
	TrendWeek,
	VerdictsResponse
} from '$lib/insights/types';
import type { Fact, Labels } from './store';

const DAY = 86_400_000;

/** Monday 00:00 UTC of the ISO week holding `ms`. */
export function weekStart(ms: number): number {
	const day = Math.floor(ms / DAY);
	// 1970-01-01 was a Thursday: (day + 3) mod 7 is 0 on Mondays.
	return (day - ((((day + 3) % 7) + 7) % 7)) * DAY;
}

const isoDay = (ms: number) => new Date(ms).toISOString().slice(0, 10);

/** The filters as a predicate; dates are whole UTC days, `to` inclusive. */
export function matcher(f: FilterValues): (fact: Fact) => boolean {
	const from = f.from ? Date.parse(`${f.from}T00:00:00Z`) : -Infinity;
	const to = f.to ? Date.parse(`${f.to}T00:00:00Z`) + DAY : Infinity;
	return (x) =>
		x.finishedAt >= from &&
		x.finishedAt < to &&
		(f.flow === undefined || x.flowId === f.flow) &&
		(f.version === undefined || x.version === f.version) &&
		(f.model === undefined || x.deviceModel === f.model) &&
		(f.technician === undefined || x.technicianId === f.technician);
}

function select(facts: Iterable<Fact>, f: FilterValues): Fact[] {
	const keep = matcher(f);
	const out: Fact[] = [];
	for (const x of facts) if (keep(x)) out.push(x);
	return out;
}

function countBy<K>(items: Iterable<K>): Map<K, number> {
	const m = new Map<K, number>();
	for (const k of items) m.set(k, (m.get(k) ?? 0) + 1);
	return m;
}

const minutes = (seconds: number) => Math.round((seconds / 60) * 10) / 10;

/**
 * How often each verdict comes up among completed runs, per flow — per flow and version when a
 * version is chosen or `byVersion` is set. Share and interval are over the completed runs of the
 * same group.
 */
export function verdicts(
	facts: Iterable<Fact>,
	f: FilterValues,
	labels: Labels,
	byVersion = f.version !== undefined
): VerdictsResponse {
	const groups = new Map<
		string,
		{ flowId: string; version: number | null; n: number; codes: Map<string, number> }
	>();
	let completed = 0;
	for (const x of select(facts, f)) {
		if (x.status !== 'completed' || x.verdictCode === null) continue;
		completed++;
		const version = byVersion ? x.version : null;
		const key = `${x.flowId}\u0000${version ?? ''}`;
		let g = groups.get(key);
		if (!g) groups.set(key, (g = { flowId: x.flowId, version, n: 0, codes: new Map() }));
		g.n++;
		g.codes.set(x.verdictCode, (g.codes.get(x.verdictCode) ?? 0) + 1);
	}
	const rows = [...groups.values()].flatMap((g) =>
		[...g.codes].map(([code, count]) => ({
			flowId: g.flowId,
			flowTitle: labels.flowTitle(g.flowId),
			version: g.version,
			verdictCode: code,
			verdictTitle: labels.verdictTitle(g.flowId, code),
			count,
			runs: g.n,
			share: count / g.n,
			...wilsonInterval(count, g.n)
		}))
	);
	rows.sort(
		(a, b) =>
			a.flowTitle.localeCompare(b.flowTitle) ||
			(a.version ?? 0) - (b.version ?? 0) ||
			b.count - a.count ||
			a.verdictCode.localeCompare(b.verdictCode)
	);
	return { rows, completed };
}

/** Finished runs per ISO week (Monday, UTC), with every week of the span present, zeros included. */
export function trend(facts: Iterable<Fact>, f: FilterValues): TrendResponse {
	const chosen = select(facts, f);
	const weeks = new Map<
		number,
		{ jobs: Set<string>; runs: number; abandoned: number; verdicts: Map<string, number> }
	>();
	const codes = new Map<string, number>();
	for (const x of chosen) {
		const w = weekStart(x.finishedAt);
		let e = weeks.get(w);
		if (!e) weeks.set(w, (e = { jobs: new Set(), runs: 0, abandoned: 0, verdicts: new Map() }));
		e.jobs.add(x.jobId);
		e.runs++;
		if (x.status === 'abandoned') e.abandoned++;
		else if (x.verdictCode) {
			e.verdicts.set(x.verdictCode, (e.verdicts.get(x.verdictCode) ?? 0) + 1);
			codes.set(x.verdictCode, (codes.get(x.verdictCode) ?? 0) + 1);
		}
	}
	const verdictCodes = [...codes].sort((a, b) => b[1] - a[1] || a[0].localeCompare(b[0])).map(([c]) => c);
	if (weeks.size === 0 && !(f.from && f.to)) return { weeks: [], verdictCodes };
	const first = f.from ? weekStart(Date.parse(`${f.from}T00:00:00Z`)) : Math.min(...weeks.keys());
	const last = f.to ? weekStart(Date.parse(`${f.to}T00:00:00Z`)) : Math.max(...weeks.keys());
	const out: TrendWeek[] = [];
	for (let w = first; w <= last; w += 7 * DAY) {
		const e = weeks.get(w);
		out.push({
			week: isoDay(w),
			jobs: e?.jobs.size ?? 0,
			runs: e?.runs ?? 0,
			abandoned: e?.abandoned ?? 0,
			verdicts: Object.fromEntries(verdictCodes.map((c) => [c, e?.verdicts.get(c) ?? 0]))
		});
	}
	return { weeks: out, verdictCodes };
}

/** Time to verdict per flow (completed runs) and time on each step (answers that still count). */
export function durations(facts: Iterable<Fact>, f: FilterValues, labels: Labels): DurationsResponse {
	const perFlow = new Map<string, number[]>();
	const perStep = new Map<string, { flowId: string; stepId: string; seconds: number[] }>();
	for (const x of select(facts, f)) {
		if (x.status === 'completed') {
			let list = perFlow.get(x.flowId);
			if (!list) perFlow.set(x.flowId, (list = []));
			list.push(x.durationS);
		}
		for (let i = 0; i < x.stepIds.length; i++) {
			const key = `${x.flowId}\u0000${x.stepIds[i]}`;
			let s = perStep.get(key);
			if (!s) perStep.set(key, (s = { flowId: x.flowId, stepId: x.stepIds[i], seconds: [] }));
			s.seconds.push(x.dwellS[i] ?? 0);
		}
	}
	const flowsOut = [...perFlow].map(([flowId, secs]) => ({
		flowId,
		flowTitle: labels.flowTitle(flowId),
		runs: secs.length,
		medianMinutes: minutes(median(secs)),
		p90Minutes: minutes(percentile(secs, 90))
	}));
	flowsOut.sort((a, b) => a.flowTitle.localeCompare(b.flowTitle));
	const steps = [...perStep.values()].map((s) => ({
		flowId: s.flowId,
		flowTitle: labels.flowTitle(s.flowId),
		stepId: s.stepId,
		stepTitle: labels.stepTitle(s.flowId, s.stepId),
		answers: s.seconds.length,
		medianMinutes: minutes(median(s.seconds)),
		p90Minutes: minutes(percentile(s.seconds, 90))
	}));
	// Longest first: the steps worth improving.
	steps.sort((a, b) => b.medianMinutes - a.medianMinutes || b.answers - a.answers);
	return { flows: flowsOut, steps };
}

/** Abandoned runs: how many, why (reasons compared case- and space-insensitively) and where. */
export function abandoned(facts: Iterable<Fact>, f: FilterValues, labels: Labels): AbandonedResponse {
	const chosen = select(facts, f);
	const gone = chosen.filter((x) => x.status === 'abandoned');
	const reasons = new Map<string, { reason: string; count: number; steps: string[] }>();
	for (const x of gone) {
		const text = (x.abandonReason ?? '').trim().replace(/\s+/g, ' ') || '(no reason given)';
		const key = text.toLowerCase();
		let r = reasons.get(key);
		if (!r) reasons.set(key, (r = { reason: text, count: 0, steps: [] }));
		r.count++;
		if (x.abandonStep) r.steps.push(`${x.flowId}\u0000${x.abandonStep}`);
	}
	const title = (key: string) => {
		const [flowId, stepId] = key.split('\u0000');
		return labels.stepTitle(flowId, stepId);
	};
	const reasonRows = [...reasons.values()].map((r) => {
		const top = [...countBy(r.steps)].sort((a, b) => b[1] - a[1])[0];
		return {
			reason: r.reason,
			count: r.count,
			share: r.count / gone.length,
			commonStep: top ? title(top[0]) : ''
		};
	});
	reasonRows.sort((a, b) => b.count - a.count || a.reason.localeCompare(b.reason));
	const steps = [
		...countBy(gone.filter((x) => x.abandonStep).map((x) => `${x.flowId}\u0000${x.abandonStep}`))
	]
		.map(([key, count]) => {
			const [flowId, stepId] = key.split('\u0000');
			return { flowId, stepId, stepTitle: labels.stepTitle(flowId, stepId), count };
		})
		.sort((a, b) => b.count - a.count || a.stepTitle.localeCompare(b.stepTitle));
	return { finished: chosen.length, abandoned: gone.length, reasons: reasonRows, steps };
}

/**
 * How often the repair confirmed each verdict, over the runs whose verdict has been judged, and the
 * overturned runs (newest first) with the note that says why.
 */
export function accuracy(
	facts: Iterable<Fact>,
	f: FilterValues,
	labels: Labels,
	{ overturnedLimit = 200 } = {}
): AccuracyResponse {
	const groups = new Map<
		string,
		{ flowId: string; code: string; completed: number; judged: number; confirmed: number }
	>();
	const overturned: Fact[] = [];
	for (const x of select(facts, f)) {
		if (x.status !== 'completed' || x.verdictCode === null) continue;
		const key = `${x.flowId}\u0000${x.verdictCode}`;
		let g = groups.get(key);
		if (!g)
			groups.set(key, (g = { flowId: x.flowId, code: x.verdictCode, completed: 0, judged: 0, confirmed: 0 }));
		g.completed++;
		if (x.confirmed !== null) g.judged++;
		if (x.confirmed === true) g.confirmed++;
		if (x.confirmed === false) overturned.push(x);
	}
	const rows = [...groups.values()].map((g) => ({
		flowId: g.flowId,
		flowTitle: labels.flowTitle(g.flowId),
		verdictCode: g.code,
		verdictTitle: labels.verdictTitle(g.flowId, g.code),
		completed: g.completed,
		judged: g.judged,
		confirmed: g.confirmed,
		share: g.judged === 0 ? 0 : g.confirmed / g.judged,
		...wilsonInterval(g.confirmed, g.judged)
	}));
	rows.sort((a, b) => a.flowTitle.localeCompare(b.flowTitle) || b.completed - a.completed);
	overturned.sort((a, b) => (b.confirmedAt ?? b.finishedAt) - (a.confirmedAt ?? a.finishedAt));
	return {
		rows,
		overturned: overturned.slice(0, overturnedLimit).map((x) => ({
			runId: x.runId,
			jobId: x.jobId,
			flowId: x.flowId,
			flowTitle: labels.flowTitle(x.flowId),
			version: x.version,
			verdictCode: x.verdictCode ?? '',
			technicianName: labels.technicianName(x.technicianId),
			note: x.confirmationNote ?? '',
			at: new Date(x.confirmedAt ?? x.finishedAt).toISOString()
		}))
	};
}

/** What the filter lists offer: only values that occur in the history. */
export function options(facts: Iterable<Fact>, labels: Labels): FilterOptions {
	const versions = new Map<string, Set<number>>();
	const models = new Set<string>();
	const techs = new Set<string>();
	let first = Infinity;
	let last = -Infinity;
	for (const x of facts) {
		if (!versions.has(x.flowId)) versions.set(x.flowId, new Set());
		versions.get(x.flowId)!.add(x.version);
		models.add(x.deviceModel);
		techs.add(x.technicianId);
		first = Math.min(first, x.finishedAt);
		last = Math.max(last, x.finishedAt);
	}
	return {
		flows: [...versions]
			.map(([id, v]) => ({ id, title: labels.flowTitle(id), versions: [...v].sort((a, b) => a - b) }))
			.sort((a, b) => a.title.localeCompare(b.title)),
		models: [...models].sort((a, b) => a.localeCompare(b)),
		technicians: [...techs]
			.map((id) => ({ id, name: labels.technicianName(id) }))
			.sort((a, b) => a.name.localeCompare(b.name)),
		first: Number.isFinite(first) ? isoDay(first) : null,
		last: Number.isFinite(last) ? isoDay(last) : null
	};
}

/** Below this many runs through a step, the run screen shows no history (too few to mean much). */
export const HISTORY_MINIMUM = 5;

/**
 * "Past runs from this step ended in …": verdicts of the completed runs of `flowId` (any version)
 * that answered `stepId`. For a symptom or test step whose answers lead to different tests, also the order
 * to check those tests in by p / cost (domain/ordering), p from how often past runs took each
 * answer and cost from the next step's minutes.
 */
export function stepHistory(
	facts: Iterable<Fact>,
	flowId: string,
	stepId: string,
	labels: Labels,
	{ minimum = HISTORY_MINIMUM, limit = 5 } = {}
): StepHistory {
	const codes = new Map<string, number>();
	const answers = new Map<number, number>();
	let runs = 0;
	let answered = 0;
	for (const x of facts) {
		if (x.flowId !== flowId) continue;
		const at = x.stepIds.indexOf(stepId);
		if (at < 0) continue;
		answered++;
		answers.set(x.outcomes[at], (answers.get(x.outcomes[at]) ?? 0) + 1);
		if (x.status !== 'completed' || x.verdictCode === null) continue;
		runs++;
		codes.set(x.verdictCode, (codes.get(x.verdictCode) ?? 0) + 1);
	}
	const base = { flowId, stepId, runs, minimum };
	if (runs < minimum) return { ...base, verdicts: [], suggestion: null };
	const verdictRows = [...codes]
		.sort((a, b) => b[1] - a[1] || a[0].localeCompare(b[0]))
		.slice(0, limit)
		.map(([code, count]) => ({
			verdictCode: code,
			verdictTitle: labels.verdictTitle(flowId, code),
			count,
			share: count / runs,
			...wilsonInterval(count, runs)
		}));
	return {
		...base,
		verdicts: verdictRows,
		suggestion: suggestOrder(flowId, stepId, answers, answered, labels)
	};
}

function suggestOrder(
	flowId: string,
	stepId: string,
	answers: Map<number, number>,
	answered: number,
	labels: Labels
): StepHistory['suggestion'] {
	const definition = labels.definition(flowId);
	const step = definition?.steps[stepId];
	if (!definition || !step || (step.kind !== 'symptom' && step.kind !== 'test')) return null;
	if (answered < HISTORY_MINIMUM) return null;
	// Outcomes that lead to the same next step are one candidate; one that repeats this step (dry
	// longer, try again) is not an alternative test.
	const byNext = new Map<string, { p: number; outcomes: string[] }>();
	(step.outcomes ?? []).forEach((o, i) => {
		const next = definition.steps[o.next];
		if (!next || o.next === stepId || (next.kind !== 'test' && next.kind !== 'measure')) return;
		const c = byNext.get(o.next) ?? { p: 0, outcomes: [] };
		c.p += (answers.get(i) ?? 0) / answered;
		c.outcomes.push(o.label);
		byNext.set(o.next, c);
	});
	if (byNext.size < 2) return null;
	const candidates = [...byNext].map(([id, c]) => {
		const next = definition.steps[id] as { title: string; minutes?: number };
		// A step authored at 0 minutes still takes some time; one minute keeps p / cost finite.
		const cost = Math.max(1, next.minutes ?? 1);
		return { id, p: Math.min(1, c.p), cost, title: next.title, outcomes: c.outcomes };
	});
	const order = orderByProbabilityOverCost(candidates);
	const likeliest = [...candidates].sort((a, b) => b.p - a.p);
	const best = expectedCost(order);
	const naive = expectedCost(likeliest);
	const first = order[0];
	return {
		order: order.map((c) => ({
			stepId: c.id,
			title: c.title,
			p: c.p,
			minutes: c.cost,
			outcomes: c.outcomes
		})),
		expectedMinutes: Math.round(best * 10) / 10,
		likeliestFirstMinutes: Math.round(naive * 10) / 10,
		reason:
			`Check “${first.title}” first because past runs make it the best ` +
			`chance per minute (${Math.round(first.p * 100)} % in ${first.cost} min). Checking in decreasing ` +
			`chance per minute averages ${Math.round(best * 10) / 10} min, against ` +
			`${Math.round(naive * 10) / 10} min likeliest first (single-fault model, every candidate checked).`
	};
}
