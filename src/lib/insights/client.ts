/**
 * Browser (and load-function) side of the insights API: query keys, fetchers and the filters read
 * from the page URL. The same key is used by the prefetch in +page.ts and by createQuery.
 */
import { filterKeys, filterQuery, insightFilters, type FilterValues } from './types';
// Zod-free, so the run screen's "past runs" panel can use them without the filter schemas.
export { intervalText, percent } from './format';
import type {
	AbandonedResponse,
	AccuracyResponse,
	DurationsResponse,
	TrendResponse,
	VerdictsResponse
} from './types';

export type InsightEndpoint = 'verdicts' | 'trend' | 'durations' | 'abandoned' | 'accuracy';
export type InsightResponses = {
	verdicts: VerdictsResponse;
	trend: TrendResponse;
	durations: DurationsResponse;
	abandoned: AbandonedResponse;
	accuracy: AccuracyResponse;
};
export const insightEndpoints: InsightEndpoint[] = [
	'verdicts',
	'trend',
	'durations',
	'abandoned',
	'accuracy'
];

/**
 * The filters in a URL. A value that does not pass the API's own checks is dropped here (the page
 * shows what is actually applied) rather than turned into an error page.
 */
export function filtersFrom(params: URLSearchParams): FilterValues {
	const out: FilterValues = {};
	for (const key of filterKeys) {
		const raw = params.get(key);
		if (!raw) continue;
		const one = insightFilters.safeParse({ [key]: raw });
		if (one.success) Object.assign(out, { [key]: one.data[key] });
	}
	if (out.from && out.to && out.from > out.to) delete out.to;
	return out;
}

export const insightKey = (endpoint: InsightEndpoint, f: FilterValues) =>
	['insights', endpoint, filterQuery(f)] as const;

export const insightUrl = (endpoint: InsightEndpoint, f: FilterValues, extra = '') => {
	const q = [filterQuery(f), extra].filter(Boolean).join('&');
	return `/api/insights/${endpoint}${q ? `?${q}` : ''}`;
};

export async function fetchInsight<E extends InsightEndpoint>(
	fetcher: typeof fetch,
	endpoint: E,
	f: FilterValues
): Promise<InsightResponses[E]> {
	const res = await fetcher(insightUrl(endpoint, f));
	if (!res.ok) {
		const body = (await res.json().catch(() => null)) as { message?: string } | null;
		throw new Error(body?.message ?? `The server answered ${res.status}.`);
	}
	return res.json();
}
