/**
 * Shapes shared by the insights API, the /insights page and the run screen's "past runs" panel.
 * Isomorphic: no server imports.
 */
import { z } from 'zod';

const day = z
	.string()
	.regex(/^\d{4}-\d{2}-\d{2}$/, 'Give dates as YYYY-MM-DD.')
	.refine((s) => !Number.isNaN(Date.parse(`${s}T00:00:00Z`)), 'This is not a calendar date.');

/** Query parameters every insights endpoint accepts. Empty strings count as "not set". */
export const insightFilters = z
	.object({
		from: day.optional(),
		to: day.optional(),
		flow: z.string().trim().min(1).max(200).optional(),
		version: z.coerce.number().int('The version is a whole number.').min(1).max(100000).optional(),
		model: z.string().trim().min(1).max(200).optional(),
		technician: z.uuid('Choose a technician from the list.').optional(),
		format: z.enum(['json', 'csv']).default('json'),
		table: z.string().max(40).optional()
	})
	.refine((f) => !f.from || !f.to || f.from <= f.to, {
		message: 'The start date must not be after the end date.',
		path: ['from']
	});
export type InsightFilters = z.infer<typeof insightFilters>;
export type FilterValues = Pick<InsightFilters, 'from' | 'to' | 'flow' | 'version' | 'model' | 'technician'>;
export const filterKeys = ['from', 'to', 'flow', 'version', 'model', 'technician'] as const;

/** URLSearchParams → a plain object for zod, dropping empty values. */
export function paramsObject(params: URLSearchParams): Record<string, string> {
	const out: Record<string, string> = {};
	for (const [k, v] of params) if (v.trim() !== '') out[k] = v;
	return out;
}

/** The filters as a query string, in a fixed key order so that query keys and URLs are stable. */
export function filterQuery(f: Partial<Record<(typeof filterKeys)[number], string | number | undefined>>) {
	const p = new URLSearchParams();
	for (const k of filterKeys) {
		const v = f[k];
		if (v !== undefined && v !== '') p.set(k, String(v));
	}
	return p.toString();
}

export type Interval = { lower: number; upper: number };

export type VerdictRow = {
	flowId: string;
	flowTitle: string;
	/** Null when the row covers every version of the flow. */
	version: number | null;
	verdictCode: string;
	verdictTitle: string;
	count: number;
	/** Completed runs of this flow (and version) in the filter. */
	runs: number;
	share: number;
} & Interval;
export type VerdictsResponse = { rows: VerdictRow[]; completed: number };

export type TrendWeek = {
	/** Monday of the ISO week (UTC), YYYY-MM-DD. */
	week: string;
	/** Distinct jobs with a run finished that week. */
	jobs: number;
	runs: number;
	abandoned: number;
	verdicts: Record<string, number>;
};
export type TrendResponse = { weeks: TrendWeek[]; verdictCodes: string[] };

export type FlowDuration = {
	flowId: string;
	flowTitle: string;
	runs: number;
	medianMinutes: number;
	p90Minutes: number;
};
export type StepDwell = {
	flowId: string;
	flowTitle: string;
	stepId: string;
	stepTitle: string;
	answers: number;
	medianMinutes: number;
	p90Minutes: number;
};
export type DurationsResponse = { flows: FlowDuration[]; steps: StepDwell[] };

export type AbandonReason = { reason: string; count: number; share: number; commonStep: string };
export type AbandonStep = { flowId: string; stepId: string; stepTitle: string; count: number };
export type AbandonedResponse = {
	finished: number;
	abandoned: number;
	reasons: AbandonReason[];
	steps: AbandonStep[];
};

export type AccuracyRow = {
	flowId: string;
	flowTitle: string;
	verdictCode: string;
	verdictTitle: string;
	completed: number;
	judged: number;
	confirmed: number;
	/** confirmed / judged; 0 when nothing was judged (the interval is then 0–1). */
	share: number;
} & Interval;
export type OverturnedRun = {
	runId: string;
	jobId: string;
	flowId: string;
	flowTitle: string;
	version: number;
	verdictCode: string;
	technicianName: string;
	note: string;
	at: string;
};
export type AccuracyResponse = { rows: AccuracyRow[]; overturned: OverturnedRun[] };

export type FilterOptions = {
	flows: { id: string; title: string; versions: number[] }[];
	models: string[];
	technicians: { id: string; name: string }[];
	/** First and last finish date in the history, YYYY-MM-DD, or null when there is none. */
	first: string | null;
	last: string | null;
};

/** "Past runs from this step" for the run screen. */
export type StepHistory = {
	flowId: string;
	stepId: string;
	/** Runs of this flow (any version) that answered this step and reached a verdict. */
	runs: number;
	/** Shown only from this many runs on. */
	minimum: number;
	verdicts: ({ verdictCode: string; verdictTitle: string; count: number; share: number } & Interval)[];
	/** For a step whose answers lead to different tests: the order to check them in, or null. */
	suggestion: {
		order: {
			stepId: string;
			title: string;
			p: number;
			minutes: number;
			outcomes: string[];
		}[];
		expectedMinutes: number;
		likeliestFirstMinutes: number;
		reason: string;
	} | null;
};
