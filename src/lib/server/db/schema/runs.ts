import { sql } from 'drizzle-orm';
import {
	bigserial,
	boolean,
	check,
	index,
	integer,
	jsonb,
	pgTable,
	text,
	uniqueIndex,
	uuid
} from 'drizzle-orm/pg-core';
// Relative imports: drizzle-kit reads this file outside Vite, where $lib does not resolve.
import { timestamptz } from './columns';
import { users } from './users';
import { jobs } from './jobs';
import { flowVersions } from './flows';

export const runStatuses = ['in-progress', 'completed', 'abandoned'] as const;
export type RunStatus = (typeof runStatuses)[number];

/**
 * One walk of a technician through one published flow version for one job. The version is pinned
 * at start: publishing a newer version never changes a run under way. `snapshot` is the xstate
 * persisted snapshot and is the authority on where the run stands.
 */
export const runs = pgTable(
	'runs',
	{
		id: uuid('id').primaryKey().defaultRandom(),
		jobId: uuid('job_id')
			.notNull()
			.references(() => jobs.id),
		flowVersionId: uuid('flow_version_id')
			.notNull()
			.references(() => flowVersions.id),
		technicianId: uuid('technician_id')
			.notNull()
			.references(() => users.id),
		status: text('status', { enum: runStatuses }).notNull().default('in-progress'),
		snapshot: jsonb('snapshot').$type<Record<string, unknown>>().notNull(),
		currentStep: text('current_step').notNull(),
		/**
		 * The number of the run's newest step row (0 before the first answer). A step event is written
		 * only while it is still the number the event was decided against (src/lib/server/runs/commit.ts).
		 */
		lastSeq: integer('last_seq').notNull().default(0),
		verdictCode: text('verdict_code'),
		verdictStep: text('verdict_step'),
		/** True once an answer recorded `data-reachable`, false on `data-unreachable`, null while unknown. */
		dataReachable: boolean('data_reachable'),
		abandonReason: text('abandon_reason'),
		startedAt: timestamptz('started_at').notNull().defaultNow(),
		finishedAt: timestamptz('finished_at'),
		updatedAt: timestamptz('updated_at').notNull().defaultNow()
	},
	(t) => [
		index('runs_job_idx').on(t.jobId, t.startedAt),
		index('runs_flow_version_idx').on(t.flowVersionId),
		check('runs_status_check', sql`${t.status} in ('in-progress', 'completed', 'abandoned')`),
		check('runs_verdict_check', sql`(${t.status} = 'completed') = (${t.verdictCode} is not null)`)
	]
);

export type StepAnswer =
	| { outcome: { index: number; label: string } }
	| { value: number; unit: string; range: { index: number; label: string | null } }
	| { back: { revised: number } };

/**
 * Every event a run accepted, in order. A BACK does not delete anything: it sets `superseded_at`
 * on the answer it revises, so the trail of first and revised answers stays readable.
 */
export const runSteps = pgTable(
	'run_steps',
	{
		id: bigserial('id', { mode: 'number' }).primaryKey(),
		runId: uuid('run_id')
			.notNull()
			.references(() => runs.id, { onDelete: 'cascade' }),
		seq: integer('seq').notNull(),
		stepId: text('step_id').notNull(),
		/** symptom | test | measure, or `back` for a revision. */
		kind: text('kind').notNull(),
		answer: jsonb('answer').$type<StepAnswer>().notNull(),
		notes: text('notes').notNull().default(''),
		actorId: uuid('actor_id').references(() => users.id),
		/** When the technician reached the step (the previous answer, or the run's start). */
		enteredAt: timestamptz('entered_at').notNull(),
		answeredAt: timestamptz('answered_at').notNull().defaultNow(),
		supersededAt: timestamptz('superseded_at'),
		idempotencyKey: text('idempotency_key').notNull(),
		/**
		 * The SHA-256 of the event's canonical JSON (src/lib/server/idempotency.ts), so the same key
		 * with a different body is refused with 422 instead of replaying this step's answer.
		 */
		bodyHash: text('body_hash'),
		/** The response sent for this event, returned unchanged when the same key arrives again. */
		result: jsonb('result').$type<Record<string, unknown>>().notNull()
	},
	(t) => [
		uniqueIndex('run_steps_run_seq_idx').on(t.runId, t.seq),
		uniqueIndex('run_steps_run_key_idx').on(t.runId, t.idempotencyKey),
		// The answer a BACK revises is the newest one still standing; without this index finding it
		// walks past every revised answer of the run.
		index('run_steps_standing_idx')
			.on(t.runId, t.seq)
			.where(sql`${t.kind} <> 'back' and ${t.supersededAt} is null`)
	]
);

export type Run = typeof runs.$inferSelect;
export type RunStep = typeof runSteps.$inferSelect;
