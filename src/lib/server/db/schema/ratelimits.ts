import { index, integer, pgTable, text, timestamp } from 'drizzle-orm/pg-core';

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
		expire: timestamp('expire', { withTimezone: true })
	},
	(t) => [index('rate_limits_expire_idx').on(t.expire)]
);
