import { sql } from 'drizzle-orm';
import { boolean, check, index, integer, pgTable, text } from 'drizzle-orm/pg-core';
import { timestamptz } from './columns';

/**
 * The shop's symptom catalogue: what intake offers and what jobs record (jobs.symptoms holds codes).
 * Flows point at symptoms through their `symptoms` tags, but a symptom needs no flow. Rows are
 * never deleted once a job may use them; a retired symptom is no longer offered at intake.
 */
export const symptoms = pgTable(
	'symptoms',
	{
		code: text('code').primaryKey(),
		label: text('label').notNull(),
		group: text('group_name').notNull(),
		sortOrder: integer('sort_order').notNull().default(0),
		retired: boolean('retired').notNull().default(false),
		createdAt: timestamptz('created_at').notNull().defaultNow(),
		updatedAt: timestamptz('updated_at').notNull().defaultNow()
	},
	(t) => [
		check('symptoms_code_check', sql`${t.code} ~ '^[a-z0-9]+(-[a-z0-9]+)*$'`),
		index('symptoms_group_idx').on(t.group, t.sortOrder)
	]
);

export type Symptom = typeof symptoms.$inferSelect;
