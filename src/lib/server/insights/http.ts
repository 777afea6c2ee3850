import { json } from '@sveltejs/kit';
import { stringify } from 'csv-stringify/sync';
import { insightFilters, paramsObject, type InsightFilters } from '$lib/insights/types';

export type InsightsApiError = { message: string; issues?: { path: string; message: string }[] };

/** The query string through zod: the filters, or a 400 JSON answer naming the bad parameter. */
export function parseFilters(
	url: URL
): { ok: true; filters: InsightFilters } | { ok: false; response: Response } {
	const parsed = insightFilters.safeParse(paramsObject(url.searchParams));
	if (parsed.success) return { ok: true, filters: parsed.data };
	const issues = parsed.error.issues.map((i) => ({ path: i.path.map(String).join('.'), message: i.message }));
	const first = issues[0];
	return {
		ok: false,
		response: json(
			{
				message: first ? `${first.path || 'query'}: ${first.message}` : 'Bad query parameters.',
				issues
			} satisfies InsightsApiError,
			{ status: 400 }
		)
	};
}

/** A 400 for a `table=` that the endpoint does not have. */
export function unknownTable(tables: readonly string[]) {
	return json({ message: `table: choose one of ${tables.join(', ')}.` } satisfies InsightsApiError, {
		status: 400
	});
}

type Column<T> = { header: string; value: (row: T) => string | number | boolean | null };

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
