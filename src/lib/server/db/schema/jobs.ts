import { sql } from 'drizzle-orm';
import {
	bigserial,
	boolean,
	check,
	index,
	integer,
	jsonb,
	pgEnum,
	pgSequence,
	pgTable,
	real,
	text,
	uniqueIndex,
	uuid
} from 'drizzle-orm/pg-core';
// Relative imports: drizzle-kit reads this file outside Vite, where $lib does not resolve.
import { timestamptz } from './columns';
import {
	liquidKinds,
	liquidTemperatures,
	waterMotions,
	type ExposureAssessment
} from '../../../domain/exposure';
import { jobStatuses } from '../../../domain/jobStatus';
import { dataOutcomes } from '../../../domain/data-first';
import type { PreRepairTest } from '../../../domain/functionTests';
import { users } from './users';

/** Reference list behind the maker/model suggestions at intake; the fields stay free text. */
export const deviceModels = pgTable(
	'device_models',
	{
		id: uuid('id').primaryKey().defaultRandom(),
		maker: text('maker').notNull(),
		model: text('model').notNull(),
		/**
		 * Functions the model has that not every phone has (capabilityCodes in domain/functionTests).
		 * Null: not declared, so the function test asks about everything.
		 */
		capabilities: text('capabilities').array()
	},
	(t) => [uniqueIndex('device_models_maker_model_idx').on(sql`lower(${t.maker})`, sql`lower(${t.model})`)]
);

export const customers = pgTable(
	'customers',
	{
		id: uuid('id').primaryKey().defaultRandom(),
		name: text('name').notNull(),
		email: text('email'),
		phone: text('phone'),
		createdAt: timestamptz('created_at').notNull().defaultNow()
	},
	(t) => [check('customers_contact_check', sql`${t.email} is not null or ${t.phone} is not null`)]
);

export const liquidKind = pgEnum('liquid_kind', liquidKinds);
/** How warm the liquid was against the phone, and whether it moved: IEC 60529's test conditions. */
export const liquidTemperature = pgEnum('liquid_temperature', liquidTemperatures);
export const waterMotion = pgEnum('water_motion', waterMotions);
export const passcodeStatuses = ['given', 'withheld', 'not-needed'] as const;
/** Whether the customer gave the passcode. The passcode itself is never stored anywhere. */
export const passcodeStatus = pgEnum('passcode_status', passcodeStatuses);

/** The human job number (TM-000123) comes from this sequence; the uuid stays the key. */
export const jobNumberSeq = pgSequence('job_number_seq', { startWith: 1, increment: 1 });

export type StoredRating = { code: string | null; declaredDepthM?: number; declaredMinutes?: number };

export const jobs = pgTable(
	'jobs',
	{
		id: uuid('id').primaryKey().defaultRandom(),
		number: integer('number')
			.notNull()
			.default(sql`nextval('job_number_seq')`),
		customerId: uuid('customer_id')
			.notNull()
			.references(() => customers.id),
		maker: text('maker').notNull(),
		model: text('model').notNull(),
		/** 15 digits, separators removed. */
		imei: text('imei'),
		/** Upper case, spaces removed. */
		serial: text('serial'),
		symptoms: text('symptoms')
			.array()
			.notNull()
			.default(sql`'{}'::text[]`),
		liquid: liquidKind('liquid').notNull(),
		exposedAt: timestamptz('exposed_at'),
		submerged: boolean('submerged').notNull(),
		depthM: real('depth_m'),
		minutes: real('minutes'),
		/** Null on jobs taken in before intake asked (the assessment then said nothing about them). */
		liquidTemperature: liquidTemperature('liquid_temperature'),
		waterMotion: waterMotion('water_motion'),
		/** Soap or detergent in fresh water; null when not asked. */
		soapy: boolean('soapy'),
		rating: jsonb('rating').$type<StoredRating>().notNull(),
		/** assessExposure's result at intake, kept so the job shows what the technician was told. */
		exposureAssessment: jsonb('exposure_assessment').$type<ExposureAssessment>().notNull(),
		dataFirst: boolean('data_first').notNull().default(false),
		/** What became of the customer's data once a run reached it (src/lib/domain/data-first.ts). */
		dataOutcome: text('data_outcome', { enum: dataOutcomes }),
		/** Where the backup went, or why there is none. */
		dataNote: text('data_note').notNull().default(''),
		dataRecordedBy: uuid('data_recorded_by').references(() => users.id),
		dataRecordedAt: timestamptz('data_recorded_at'),
		passcodeStatus: passcodeStatus('passcode_status').notNull(),
		consentToOpen: boolean('consent_to_open').notNull().default(false),
		consentAt: timestamptz('consent_at'),
		notes: text('notes').notNull().default(''),
		/** The date the shop told the customer the phone would be ready (intake, default from the turnaround setting). */
		promisedAt: timestamptz('promised_at'),
		/** What worked when the phone came in; null until someone records it. */
		preRepairTest: jsonb('pre_repair_test').$type<PreRepairTest>(),
		status: text('status', { enum: jobStatuses }).notNull().default('received'),
		technicianId: uuid('technician_id').references(() => users.id),
		createdBy: uuid('created_by').references(() => users.id),
		createdAt: timestamptz('created_at').notNull().defaultNow(),
		updatedAt: timestamptz('updated_at').notNull().defaultNow()
	},
	(t) => [
		uniqueIndex('jobs_number_idx').on(t.number),
		index('jobs_status_idx').on(t.status),
		index('jobs_technician_idx').on(t.technicianId),
		index('jobs_created_at_idx').on(t.createdAt),
		index('jobs_imei_idx').on(t.imei),
		index('jobs_promised_at_idx').on(t.promisedAt),
		check('jobs_identifier_check', sql`${t.imei} is not null or ${t.serial} is not null`),
		check('jobs_imei_format_check', sql`${t.imei} is null or ${t.imei} ~ '^[0-9]{15}$'`),
		check('jobs_status_check', sql.raw(`status in (${jobStatuses.map((s) => `'${s}'`).join(', ')})`)),
		check('jobs_consent_check', sql`not ${t.consentToOpen} or ${t.consentAt} is not null`),
		check(
			'jobs_data_outcome_check',
			sql.raw(
				`data_outcome is null or (data_outcome in (${dataOutcomes.map((o) => `'${o}'`).join(', ')}) and data_recorded_at is not null)`
			)
		)
	]
);

/** Status history: one row per change, the first with `from` null (intake). */
export const jobEvents = pgTable(
	'job_events',
	{
		id: bigserial('id', { mode: 'number' }).primaryKey(),
		jobId: uuid('job_id')
			.notNull()
			.references(() => jobs.id, { onDelete: 'cascade' }),
		fromStatus: text('from_status', { enum: jobStatuses }),
		toStatus: text('to_status', { enum: jobStatuses }).notNull(),
		by: uuid('by').references(() => users.id),
		at: timestamptz('at').notNull().defaultNow(),
		note: text('note').notNull().default('')
	},
	(t) => [index('job_events_job_idx').on(t.jobId, t.at)]
);

export type DeviceModel = typeof deviceModels.$inferSelect;
export type Customer = typeof customers.$inferSelect;
export type Job = typeof jobs.$inferSelect;
export type JobEvent = typeof jobEvents.$inferSelect;
