import { index, integer, pgTable, text } from 'drizzle-orm/pg-core';
import { timestamptz } from './columns';

/**
 * Rate-limit counters when the app runs on a PostgreSQL server (several processes share them, and
 * a restart keeps them): rate-limiter-flexible's drizzle store reads and writes this table with one
 * atomic upsert per count. The embedded database keeps its counters in the process's memory.
 */
export const rateLimits = pgTable(
	'rate_limits',
	{
		key: text('key').primaryKey(),
		points: integer('points').notNull(),
		expire: timestamptz('expire')
	},
	(t) => [index('rate_limits_expire_idx').on(t.expire)]
);
