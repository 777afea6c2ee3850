/**
 * Answer shapes of the job, photo and device-model routes as zod schemas, for /api/openapi.json.
 * The routes build these answers from typed queries; `Same<…>` below fails the type check when a
 * query's type and its schema part ways. (The run answers live beside the run requests in
 * $lib/schemas/run.)
 */
import { functionResults } from '$lib/domain/functionTests';
import { z } from 'zod';
import {
	exposureReasons,
	exposureStatuses,
	liquidKinds,
	liquidTemperatures,
	waterMotions
} from '$lib/domain/exposure';
import { jobStatuses } from '$lib/domain/jobStatus';
import { dataOutcomes } from '$lib/domain/data-first';
import { passcodeStatuses } from '$lib/schemas/job';
import { photoSources, type PhotoDto } from '$lib/photos/limits';
import type { PhotoErrorResponse, PhotoListResponse, PhotoUploadResponse } from '$lib/photos/api';
import type { ApiError, Jsonify } from '$lib/server/http';
import type { JobDetail, JobList } from '$lib/server/jobs/queries';
import type { DeviceModelSuggestion } from '$lib/server/jobs/device-models';

const at = z.iso.datetime({ offset: true });
const issue = z.object({ path: z.string(), message: z.string() });

export const apiError = z
	.object({
		message: z.string().meta({ description: 'A sentence for the person at the bench.' }),
		code: z
			.string()
			.optional()
			.meta({ description: 'A stable machine code for the refusal, e.g. not-found, invalid-transition.' }),
		issues: z.array(issue).optional().meta({ description: 'One entry per field that needs attention.' })
	})
	.meta({ id: 'ApiError' });

export const jobListRow = z
	.object({
		id: z.uuid(),
		number: z.number().int(),
		customerName: z.string(),
		maker: z.string(),
		model: z.string(),
		imei: z.string().nullable(),
		serial: z.string().nullable(),
		status: z.enum(jobStatuses),
		exposureStatus: z.string(),
		dataFirst: z.boolean(),
		technicianId: z.uuid().nullable(),
		technicianName: z.string().nullable(),
		liquid: z.enum(liquidKinds),
		exposedAt: at.nullable(),
		promisedAt: at.nullable().meta({ description: 'The end of the day promised to the customer.' }),
		createdAt: at,
		updatedAt: at
	})
	.meta({ id: 'JobListRow' });

export const jobList = z
	.object({
		rows: z.array(jobListRow),
		total: z.number().int(),
		page: z.number().int(),
		size: z.number().int(),
		pages: z.number().int()
	})
	.meta({ id: 'JobList' });

export const jobCreated = z.object({
	id: z.uuid(),
	number: z.number().int(),
	jobNumber: z.string().meta({ examples: ['TM-000123'] })
});

export const jobDetail = z
	.object({
		id: z.uuid(),
		number: z.number().int(),
		customerId: z.uuid(),
		maker: z.string(),
		model: z.string(),
		imei: z.string().nullable(),
		serial: z.string().nullable(),
		symptoms: z.array(z.string()),
		liquid: z.enum(liquidKinds),
		exposedAt: at.nullable(),
		submerged: z.boolean(),
		depthM: z.number().nullable(),
		minutes: z.number().nullable(),
		liquidTemperature: z
			.enum(liquidTemperatures)
			.nullable()
			.meta({ description: 'Against the phone: warm and hot are more than 5 K warmer. Null: not asked.' }),
		waterMotion: z.enum(waterMotions).nullable().meta({ description: 'Null: not asked.' }),
		soapy: z.boolean().nullable().meta({ description: 'Soap or detergent in fresh water. Null: not asked.' }),
		rating: z.object({
			code: z.string().nullable(),
			declaredDepthM: z.number().optional(),
			declaredMinutes: z.number().optional()
		}),
		exposureAssessment: z.object({
			status: z.enum(exposureStatuses),
			reasons: z.array(z.enum(exposureReasons)),
			explanation: z.string()
		}),
		dataFirst: z.boolean(),
		dataOutcome: z
			.enum(dataOutcomes)
			.nullable()
			.meta({ description: 'What became of the customer’s data, once recorded (PUT /api/jobs/{id}/data).' }),
		dataNote: z.string().meta({ description: 'Where the backup went, or why there is none.' }),
		dataRecordedBy: z.uuid().nullable(),
		dataRecordedAt: at.nullable(),
		dataRecordedByName: z.string().nullable(),
		passcodeStatus: z.enum(passcodeStatuses).meta({ description: 'Never the passcode itself.' }),
		consentToOpen: z.boolean(),
		consentAt: at.nullable(),
		notes: z.string(),
		promisedAt: at.nullable().meta({ description: 'The end of the day promised to the customer.' }),
		preRepairTest: z
			.object({
				couldNotPowerOn: z.boolean(),
				items: z.array(
					z.object({
						key: z.string(),
						label: z.string(),
						result: z.enum(functionResults),
						note: z.string()
					})
				),
				at: z.string(),
				by: z.string().nullable()
			})
			.nullable()
			.meta({ description: 'What worked when the phone came in; null when not recorded.' }),
		status: z.enum(jobStatuses),
		technicianId: z.uuid().nullable(),
		createdBy: z.uuid().nullable(),
		createdAt: at,
		updatedAt: at,
		customer: z.object({
			id: z.uuid(),
			name: z.string(),
			email: z.string().nullable(),
			phone: z.string().nullable()
		}),
		technicianName: z.string().nullable(),
		createdByName: z.string().nullable(),
		history: z.array(
			z.object({
				id: z.number().int(),
				fromStatus: z.enum(jobStatuses).nullable(),
				toStatus: z.enum(jobStatuses),
				byName: z.string().nullable(),
				at,
				note: z.string()
			})
		),
		next: z.array(z.enum(jobStatuses)).meta({ description: 'The statuses the job may move to now.' })
	})
	.meta({ id: 'JobDetail' });

export const deviceModels = z.object({
	models: z.array(
		z.object({ maker: z.string(), model: z.string(), capabilities: z.array(z.string()).nullable() })
	)
});

export const photo = z
	.object({
		id: z.uuid(),
		jobId: z.uuid(),
		runId: z.uuid().nullable(),
		stepId: z.string().nullable(),
		source: z.enum(photoSources),
		caption: z.string(),
		mime: z.string(),
		width: z.number().int(),
		height: z.number().int(),
		bytes: z.number().int(),
		uploadedBy: z.uuid().nullable(),
		uploadedByName: z.string().nullable(),
		createdAt: at,
		shownToCustomer: z.boolean(),
		thumbUrl: z.string(),
		displayUrl: z.string(),
		originalUrl: z.string()
	})
	.meta({ id: 'Photo' });

export const photoList = z.object({ photos: z.array(photo) });
export const photoUploaded = z.object({
	photo,
	duplicate: z.boolean().meta({ description: 'The same file was already filed here; nothing new stored.' })
});
export const photoError = z
	.object({
		message: z.string(),
		code: z
			.enum([
				'empty',
				'too-big',
				'not-an-image',
				'unsupported-type',
				'too-many-pixels',
				'corrupt',
				'bad-request',
				'not-found',
				'forbidden',
				'unknown-step'
			])
			.optional(),
		issues: z.array(issue).optional()
	})
	.meta({ id: 'PhotoError' });

type Same<A, B> = [A] extends [B] ? ([B] extends [A] ? true : false) : false;
const inStep: [
	Same<z.infer<typeof apiError>, ApiError>,
	Same<z.infer<typeof jobList>, Jsonify<JobList>>,
	Same<z.infer<typeof jobDetail>, Jsonify<JobDetail>>,
	Same<z.infer<typeof deviceModels>['models'][number], DeviceModelSuggestion>,
	Same<z.infer<typeof photo>, PhotoDto>,
	Same<z.infer<typeof photoList>, PhotoListResponse>,
	Same<z.infer<typeof photoUploaded>, PhotoUploadResponse>,
	Same<z.infer<typeof photoError>, PhotoErrorResponse>
] = [true, true, true, true, true, true, true, true];
void inStep;
