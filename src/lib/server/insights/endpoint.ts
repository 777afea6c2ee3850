// The /api/insights/* endpoints' common shape: filters through zod, JSON or a CSV table.
import { json } from '@sveltejs/kit';
import { stringify } from 'csv-stringify/sync';
import { insightFilters, paramsObject, type InsightFilters } from '$lib/insights/types';
import { issuesOf, type ApiError } from '$lib/server/http';

/** The query string through zod: the filters, or a 400 JSON answer naming the bad parameter. */
export function parseFilters(
	url: URL
): { ok: true; filters: InsightFilters } | { ok: false; response: Response } {
	const parsed = insightFilters.safeParse(paramsObject(url.searchParams));
	if (parsed.success) return { ok: true, filters: parsed.data };
	const issues = issuesOf(parsed.error);
	const first = issues[0];
	return {
		ok: false,
		response: json(
			{
				message: first ? `${first.path || 'query'}: ${first.message}` : 'Bad query parameters.',
				code: 'bad-request',
				issues
			} satisfies ApiError,
			{ status: 400 }
		)
	};
}

/** A 400 for a `table=` that the endpoint does not have. */
export function unknownTable(tables: readonly string[]) {
	return json({ message: `table: choose one of ${tables.join(', ')}.` } satisfies ApiError, {
		status: 400
	});
}

export type Column<T> = { header: string; value: (row: T) => string | number | boolean | null };

/** One table as a CSV download (RFC 4180 quoting by csv-stringify). */
export function csv<T>(name: string, rows: readonly T[], columns: Column<T>[]): Response {
	const body = stringify(
		rows.map((r) => columns.map((c) => c.value(r))),
		{ header: true, columns: columns.map((c) => c.header) }
	);
	return new Response(body, {
		headers: {
			'content-type': 'text/csv; charset=utf-8',
			'content-disposition': `attachment; filename="tidemark-${name}.csv"`
		}
	});
}

/** Proportions in CSV: four decimals, enough to compare with published tables. */
export const fixed4 = (x: number) => Number(x.toFixed(4));

/**
 * One /api/insights/* endpoint after its guard: the filters through zod (400 otherwise), the
 * answer computed, then JSON or, with `format=csv`, the CSV of the chosen table (`table=`, the
 * first one by default). An endpoint with several tables refuses a `table` it does not have.
 */
export function insightsEndpoint<T, K extends string>(spec: {
	compute: (filters: InsightFilters) => Promise<T>;
	tables: Record<K, (data: T) => Response>;
}): (url: URL) => Promise<Response> {
	const names = Object.keys(spec.tables) as K[];
	return async (url) => {
		const parsed = parseFilters(url);
		if (!parsed.ok) return parsed.response;
		const { filters } = parsed;
		const chosen = filters.table as K | undefined;
		if (names.length > 1 && chosen && !names.includes(chosen)) return unknownTable(names);
		const data = await spec.compute(filters);
		if (filters.format !== 'csv') return json(data);
		return spec.tables[chosen && names.includes(chosen) ? chosen : names[0]](data);
	};
}
