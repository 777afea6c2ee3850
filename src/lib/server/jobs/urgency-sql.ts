/**
 * The urgency rule of `$lib/domain/urgency.ts` as SQL, so the job list can sort, filter and page by
 * it in the database. `urgency-sql.spec.ts` holds the two to the same answers over a grid of
 * liquids and waits: change both together.
 */
import { sql, type SQL } from 'drizzle-orm';
import { jobs } from '$lib/server/db/schema/jobs';
import { openStatuses } from '$lib/domain/queue';

const open = sql.raw(`(${openStatuses.map((s) => `'${s}'`).join(', ')})`);

/** 0 low · 1 elevated · 2 high · 3 critical, as of `now`. */
export function urgencyRankSql(now: Date): SQL<number> {
	const hours = sql`extract(epoch from (${now.toISOString()}::timestamptz - ${jobs.exposedAt})) / 3600`;
	return sql<number>`least(3,
		(case ${jobs.liquid} when 'fresh' then 0 when 'salt' then 2 when 'sugary' then 2 else 1 end)
		+ (case when ${jobs.exposedAt} is null then 1 when ${hours} < 6 then 0 when ${hours} < 24 then 1
			when ${hours} < 72 then 2 else 3 end))`;
}

export const isOpenSql = sql<boolean>`${jobs.status} in ${open}`;

/** Open jobs whose promised day has passed (queue.ts `isOverdue`). */
export const overdueSql = (now: Date) =>
	sql<boolean>`(${isOpenSql} and ${jobs.promisedAt} < ${now.toISOString()}::timestamptz)`;
