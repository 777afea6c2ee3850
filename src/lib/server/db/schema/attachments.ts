import { sql } from 'drizzle-orm';
import { bigint, boolean, check, index, integer, pgTable, text, uuid } from 'drizzle-orm/pg-core';
// Relative imports: drizzle-kit reads this file outside Vite, where $lib does not resolve.
import { timestamptz } from './columns';
import { photoSources } from '../../../photos/limits';
import { jobs } from './jobs';
import { runs, runSteps } from './runs';
import { users } from './users';

export const attachmentKinds = ['photo'] as const;

/**
 * Evidence attached to a job, optionally to a run and the flow step it was taken at. The files sit
 * in the blob store (see $lib/server/storage) under the SHA-256 of their bytes; this row holds the
 * keys. Every stored variant has had its metadata removed (see $lib/server/photos/process.ts).
 */
export const attachments = pgTable(
	'attachments',
	{
		id: uuid('id').primaryKey().defaultRandom(),
		jobId: uuid('job_id')
			.notNull()
			.references(() => jobs.id),
		/** The run it was taken during, if any. */
		runId: uuid('run_id').references(() => runs.id),
		/** The flow step (its id in the flow) the photo belongs to; photos are taken before the step is answered. */
		stepId: text('step_id'),
		/** The recorded answer (run_steps row) it belongs to, when one is known. */
		runStepId: bigint('run_step_id', { mode: 'number' }).references(() => runSteps.id),
		kind: text('kind', { enum: attachmentKinds }).notNull().default('photo'),
		source: text('source', { enum: photoSources }).notNull(),
		caption: text('caption').notNull().default(''),
		/** SHA-256 of the file exactly as uploaded: recognises the same upload made twice. */
		sha256: text('sha256').notNull(),
		/** Blob keys: full resolution (stripped), display size, thumbnail. */
		originalKey: text('original_key').notNull(),
		displayKey: text('display_key').notNull(),
		thumbKey: text('thumb_key').notNull(),
		/** Type of the stored original (JPEG, PNG or WebP); display and thumbnail are always WebP. */
		mime: text('mime').notNull(),
		width: integer('width').notNull(),
		height: integer('height').notNull(),
		/** Size of the stored original in bytes. */
		bytes: integer('bytes').notNull(),
		uploadedBy: uuid('uploaded_by').references(() => users.id),
		createdAt: timestamptz('created_at').notNull().defaultNow(),
		/** Whether the customer report includes it; staff choose, nothing is shown by default. */
		shownToCustomer: boolean('shown_to_customer').notNull().default(false)
	},
	(t) => [
		index('attachments_job_idx').on(t.jobId, t.createdAt),
		index('attachments_job_sha256_idx').on(t.jobId, t.sha256),
		index('attachments_run_idx').on(t.runId, t.stepId),
		index('attachments_original_key_idx').on(t.originalKey),
		index('attachments_display_key_idx').on(t.displayKey),
		index('attachments_thumb_key_idx').on(t.thumbKey),
		check('attachments_kind_check', sql`${t.kind} in ('photo')`),
		check('attachments_source_check', sql.raw(`source in (${photoSources.map((s) => `'${s}'`).join(', ')})`)),
		check('attachments_step_needs_run_check', sql`${t.stepId} is null or ${t.runId} is not null`),
		check(
			'attachments_keys_check',
			sql`${t.originalKey} ~ '^[0-9a-f]{64}$' and ${t.displayKey} ~ '^[0-9a-f]{64}$' and ${t.thumbKey} ~ '^[0-9a-f]{64}$'`
		)
	]
);

export type Attachment = typeof attachments.$inferSelect;
