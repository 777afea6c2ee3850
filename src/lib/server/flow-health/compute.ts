/**
 * Flow health of one version: a pure function of the version's finished runs (the insights facts),
 * the steps each run revised (BACK), and the version's definition — so the specs can check every
 * figure against a hand-computed history. Intervals are Wilson 95 %, times type-7 percentiles
 * (domain/stats), as on Insights.
 */
import { median, percentile, wilsonInterval } from '$lib/domain/stats';
import type { FlowDefinition } from '$lib/flows/schema';
import { intervalText, percent } from '$lib/insights/format';
import {
	editHref,
	readHref,
	type Flag,
	type Share,
	type StepHealth,
	type VersionHealth
} from '$lib/flow-health/types';
import type { Fact } from '$lib/server/insights/store';
import { STANDOUT } from './thresholds';

const NONE: ReadonlySet<string> = new Set();

export function share(count: number, of: number): Share {
	return { count, of, share: of === 0 ? 0 : count / of, ...wilsonInterval(count, of) };
}

/** 14 → "14", 2.25 → "2.3": minutes as people say them. */
export function minutesText(m: number): string {
	return String(Math.round(m * 10) / 10);
}

const shareText = (s: Share) => `${percent(s.share)}, 95 % ${intervalText(s.lower, s.upper)}`;

type Acc = {
	reached: number;
	answered: number;
	answeredAny: number;
	revised: number;
	seconds: number[];
	abandoned: number;
	judged: number;
	overturned: number;
};

export type VersionInput = {
	flowId: string;
	flowTitle: string;
	version: number;
	status: 'published' | 'retired';
	definition: FlowDefinition;
};

/**
 * `facts` may hold other versions' runs: only `input.version` of `input.flowId` counts.
 * `revisedOf(runId)` gives the steps where that run's answer was revised by a BACK.
 */
export function versionHealth(
	input: VersionInput,
	facts: Iterable<Fact>,
	revisedOf: (runId: string) => ReadonlySet<string> | undefined
): VersionHealth {
	const { definition } = input;
	const acc = new Map<string, Acc>();
	for (const id of Object.keys(definition.steps))
		acc.set(id, {
			reached: 0,
			answered: 0,
			answeredAny: 0,
			revised: 0,
			seconds: [],
			abandoned: 0,
			judged: 0,
			overturned: 0
		});
	const verdictStep = new Map<string, string>();
	for (const [id, step] of Object.entries(definition.steps))
		if (step.kind === 'verdict') verdictStep.set(step.verdict.code, id);

	let runs = 0;
	let completed = 0;
	let abandoned = 0;
	let judged = 0;
	let overturned = 0;
	for (const x of facts) {
		if (x.flowId !== input.flowId || x.version !== input.version) continue;
		runs++;
		const standing = new Set(x.stepIds);
		const revised = revisedOf(x.runId) ?? NONE;
		x.stepIds.forEach((id, i) => acc.get(id)?.seconds.push(x.dwellS[i] ?? 0));
		for (const id of new Set([...standing, ...revised])) {
			const a = acc.get(id);
			if (!a) continue;
			a.answeredAny++;
			if (revised.has(id)) a.revised++;
		}
		// The path: the answers that still stood, and the verdict the run ended on.
		const path = new Set(standing);
		const reached = new Set([...standing, ...revised]);
		if (x.status === 'abandoned') {
			abandoned++;
			if (x.abandonStep) {
				reached.add(x.abandonStep);
				const a = acc.get(x.abandonStep);
				if (a) a.abandoned++;
			}
		} else {
			completed++;
			const end = x.verdictCode === null ? undefined : verdictStep.get(x.verdictCode);
			if (end) {
				path.add(end);
				reached.add(end);
			}
		}
		for (const id of reached) {
			const a = acc.get(id);
			if (!a) continue;
			a.reached++;
			if (path.has(id)) a.answered++;
		}
		if (x.status === 'completed' && x.confirmed !== null) {
			judged++;
			if (x.confirmed === false) overturned++;
			for (const id of path) {
				const a = acc.get(id);
				if (!a) continue;
				a.judged++;
				if (x.confirmed === false) a.overturned++;
			}
		}
	}

	const overall = share(overturned, judged);
	const steps: StepHealth[] = [...acc].map(([stepId, a]) => {
		const step = definition.steps[stepId];
		const isVerdict = step.kind === 'verdict';
		const expected = step.minutes ?? null;
		const time =
			a.seconds.length === 0
				? null
				: {
						answers: a.seconds.length,
						medianMinutes: median(a.seconds) / 60,
						p90Minutes: percentile(a.seconds, 90) / 60
					};
		const row: StepHealth = {
			stepId,
			title: step.title,
			kind: step.kind,
			expectedMinutes: expected,
			reached: a.reached,
			answered: a.answered,
			revised: isVerdict ? null : share(a.revised, a.answeredAny),
			time,
			abandoned: share(a.abandoned, a.reached),
			overturned: share(a.overturned, a.judged),
			flags: [],
			links: {
				edit: editHref(input.flowId, input.version, stepId),
				read: readHref(input.flowId, input.version, stepId)
			}
		};
		row.flags = flagsOf(row, { abandoned, overturned, overall });
		return row;
	});
	return {
		flowId: input.flowId,
		flowTitle: input.flowTitle,
		version: input.version,
		status: input.status,
		runs,
		completed,
		abandoned,
		judged,
		overturned,
		steps,
		flagged: steps.filter((s) => s.flags.length > 0).length
	};
}

/** The reasons a step stands out, by the rules in thresholds.ts. */
export function flagsOf(
	s: StepHealth,
	version: { abandoned: number; overturned: number; overall: Share }
): Flag[] {
	const flags: Flag[] = [];
	const r = s.revised;
	if (r && r.of >= STANDOUT.minRuns && r.share >= STANDOUT.revised.share && r.lower >= STANDOUT.revised.lower)
		flags.push({
			kind: 'revised',
			reason: `answers revised in ${percent(r.share)} of runs (${r.count}/${r.of}, 95 % ${intervalText(r.lower, r.upper)})`
		});

	const t = s.time;
	if (t && s.expectedMinutes !== null && t.answers >= STANDOUT.minRuns) {
		const e = s.expectedMinutes;
		const { medianRatio, extraMinutes, p90Ratio, p90ExtraMinutes } = STANDOUT.slow;
		if (t.medianMinutes >= e * medianRatio && t.medianMinutes - e >= extraMinutes)
			flags.push({
				kind: 'slow',
				reason: `median ${minutesText(t.medianMinutes)} min against ${minutesText(e)} expected (${t.answers} answers)`
			});
		else if (t.p90Minutes >= e * p90Ratio && t.p90Minutes - e >= p90ExtraMinutes)
			flags.push({
				kind: 'slow',
				reason: `1 answer in 10 takes ${minutesText(t.p90Minutes)} min or more against ${minutesText(e)} expected (${t.answers} answers)`
			});
	}

	const a = s.abandoned;
	if (
		a.of >= STANDOUT.minRuns &&
		a.count >= STANDOUT.abandoned.count &&
		a.share >= STANDOUT.abandoned.share &&
		a.lower >= STANDOUT.abandoned.lower
	)
		flags.push({
			kind: 'abandoned',
			reason: `${a.count} of ${version.abandoned} abandoned runs stopped here: ${a.count} of the ${a.of} runs that reached it (${shareText(a)})`
		});

	const o = s.overturned;
	if (o.count >= STANDOUT.overturned.count && o.lower > version.overall.share) {
		const against = `against ${version.overall.count} of ${version.overall.of} (${percent(version.overall.share)}) for the version`;
		flags.push({
			kind: 'overturned',
			reason:
				s.kind === 'verdict'
					? `${o.count} of ${version.overturned} overturned verdicts were this one: overturned in ${o.count} of ${o.of} judged runs (${shareText(o)}) ${against}`
					: `on the path of ${o.count} of ${version.overturned} overturned verdicts: ${o.count} of ${o.of} judged verdicts through here were overturned (${shareText(o)}) ${against}`
		});
	}
	return flags;
}
