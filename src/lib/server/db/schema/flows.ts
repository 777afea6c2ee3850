import { sql } from 'drizzle-orm';
import {
	check,
	index,
	integer,
	jsonb,
	pgTable,
	text,
	unique,
	uuid,
	type AnyPgColumn
} from 'drizzle-orm/pg-core';
import { timestamptz } from './columns';
import type { FlowDefinition } from '../../../flows/schema';
import { users } from './users';

export const flowStatuses = ['draft', 'in-review', 'published', 'retired'] as const;
export type FlowStatus = (typeof flowStatuses)[number];

/** One row per flow id. Title and symptoms mirror the newest published version (or the first draft). */
export const flows = pgTable('flows', {
	id: text('id').primaryKey(),
	title: text('title').notNull(),
	symptoms: text('symptoms')
		.array()
		.notNull()
		.default(sql`'{}'::text[]`),
	createdAt: timestamptz('created_at').notNull().defaultNow()
});

/**
 * Every draft and every published version of a flow. A version number is given at publication and
 * never changes; published definitions are immutable. Runs pin a row of this table by its id.
 */
export const flowVersions = pgTable(
	'flow_versions',
	{
		id: uuid('id').primaryKey().defaultRandom(),
		flowId: text('flow_id')
			.notNull()
			.references(() => flows.id),
		/** Null while a draft or in review; N+1 of the flow when published. */
		version: integer('version'),
		status: text('status', { enum: flowStatuses }).notNull().default('draft'),
		definition: jsonb('definition').$type<FlowDefinition>().notNull(),
		/** jsonb keeps object keys in its own order, so the authored order of the steps is kept here. */
		stepOrder: text('step_order').array().notNull(),
		/** sha256 (hex) of the canonical JSON of the definition: sorted keys, no whitespace. */
		checksum: text('checksum').notNull(),
		/** Null for files imported at start-up. */
		authorId: uuid('author_id').references(() => users.id),
		reviewerId: uuid('reviewer_id').references(() => users.id),
		/** The version a draft was started from, for the diff; null for a new flow or an import. */
		basedOnId: uuid('based_on_id').references((): AnyPgColumn => flowVersions.id),
		changelog: text('changelog'),
		reviewComment: text('review_comment'),
		/** Bumped on every save of a draft; a save naming an older revision is a conflict. */
		revision: integer('revision').notNull().default(1),
		createdAt: timestamptz('created_at').notNull().defaultNow(),
		updatedAt: timestamptz('updated_at').notNull().defaultNow(),
		submittedAt: timestamptz('submitted_at'),
		publishedAt: timestamptz('published_at'),
		retiredAt: timestamptz('retired_at')
	},
	(t) => [
		unique('flow_versions_flow_version_uq').on(t.flowId, t.version),
		index('flow_versions_status_idx').on(t.status),
		index('flow_versions_flow_idx').on(t.flowId),
		check('flow_versions_status_check', sql`${t.status} in ('draft', 'in-review', 'published', 'retired')`),
		// Published and retired versions carry a number; drafts and drafts in review do not.
		check(
			'flow_versions_version_check',
			sql`(${t.status} in ('published', 'retired')) = (${t.version} is not null)`
		)
	]
);

export type Flow = typeof flows.$inferSelect;
export type FlowVersion = typeof flowVersions.$inferSelect;
