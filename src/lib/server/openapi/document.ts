// Over 300 lines on purpose: the API's OpenAPI document, one entry per route.
/**
 * The OpenAPI 3.1 document of the bench's JSON routes, served at /api/openapi.json. Generated, not
 * written: every request body and query parameter is `z.toJSONSchema` of the very schema the route
 * parses with, and every answer is a schema from ./responses or $lib/schemas/run. Schemas with a
 * `meta({ id })` become `components.schemas` entries.
 */
import { z } from 'zod';
import { jobListQuery, jobPatch, makeJobIntake } from '$lib/schemas/job';
import { dataOutcomeInput } from '$lib/schemas/data-outcome';
import { deviceModelQuery } from '$lib/schemas/device-model';
import { photoUploadFields, runPhotoListQuery, runPhotoUploadFields } from '$lib/photos/api';
import { MAX_PHOTO_BYTES } from '$lib/photos/limits';
import {
	runAbandonedResponse,
	runAbandonInput,
	runApiError,
	runDetail,
	runEventInput,
	runEventResult,
	runListQuery,
	runListResponse,
	runStartedResponse,
	runStartInput
} from '$lib/schemas/run';
import * as answers from './responses';

type Json = Record<string, unknown>;
type Io = 'input' | 'output';

/** The JSON Schema of `schema` exactly as z.toJSONSchema gives it, less the `$schema` line. */
export function jsonSchemaOf(schema: z.ZodType, io: Io): Json {
	const out = z.toJSONSchema(schema, { target: 'draft-2020-12', io, unrepresentable: 'any' }) as Json;
	delete out.$schema;
	return out;
}

function rewriteRefs(node: unknown): unknown {
	if (Array.isArray(node)) return node.map(rewriteRefs);
	if (!node || typeof node !== 'object') return node;
	const out: Json = {};
	for (const [k, v] of Object.entries(node)) {
		out[k] =
			k === '$ref' && typeof v === 'string'
				? v.replace(/^#\/\$defs\//, '#/components/schemas/')
				: rewriteRefs(v);
	}
	return out;
}

/** Builds the document; shared sub-schemas move into `components` and are referenced from there. */
export function buildOpenApiDocument(origin = '') {
	const components: Record<string, Json> = {};

	const schema = (s: z.ZodType, io: Io): Json => {
		const { $defs, ...rest } = jsonSchemaOf(s, io) as Json & { $defs?: Record<string, Json> };
		for (const [id, def] of Object.entries($defs ?? {})) {
			const hoisted = rewriteRefs(def) as Json;
			const key = io === 'input' && components[id] && !same(components[id], hoisted) ? `${id}Input` : id;
			components[key] = hoisted;
		}
		return rewriteRefs(rest) as Json;
	};
	const json = (s: z.ZodType, io: Io = 'output') => ({ 'application/json': { schema: schema(s, io) } });
	const reply = (description: string, s: z.ZodType = answers.apiError) => ({ description, content: json(s) });
	const body = (s: z.ZodType) => ({ required: true, content: json(s, 'input') });
	const query = (s: z.ZodObject) =>
		Object.entries(s.shape).map(([name, field]) => {
			const p = jsonSchemaOf(field as z.ZodType, 'input');
			const required = !(field as z.ZodType).safeParse(undefined).success;
			return { name, in: 'query', required, schema: p };
		});
	const pathId = (what: string) => ({
		name: 'id',
		in: 'path',
		required: true,
		description: `The ${what}'s id.`,
		schema: { type: 'string', format: 'uuid' }
	});
	const multipart = (fields: z.ZodObject, description: string) => {
		const f = jsonSchemaOf(fields, 'input') as { properties: Json; required?: string[] };
		return {
			required: true,
			description,
			content: {
				'multipart/form-data': {
					schema: {
						...f,
						properties: {
							file: {
								type: 'string',
								contentMediaType: 'application/octet-stream',
								description: `JPEG, PNG or WebP (HEIC where the server can decode it), at most ${MAX_PHOTO_BYTES} bytes; the type is read from the bytes.`
							},
							...f.properties
						},
						required: ['file', ...(f.required ?? [])]
					}
				}
			}
		};
	};
	const unauthorised = { $ref: '#/components/responses/Unauthorised' };
	const forbidden = { $ref: '#/components/responses/Forbidden' };
	const guarded = { '401': unauthorised, '403': forbidden };
	const photoErrors = {
		'400': reply(
			'A bad `source`, `caption` or `stepId`, not multipart, no file part, or more than one file (one photo per request).',
			answers.photoError
		),
		'404': reply('No such job or run.', answers.photoError),
		'413': reply('Over the size limit.', answers.photoError),
		'415': reply('Empty, not an image, or an image type that is not accepted.', answers.photoError),
		'422': reply('Too many pixels, or cut off / damaged.', answers.photoError)
	};

	const paths = {
		'/api/jobs': {
			get: {
				operationId: 'listJobs',
				summary: 'Jobs, searched, filtered, sorted and paged',
				description: 'Unknown filter or sort values fall back to the defaults instead of failing.',
				parameters: query(jobListQuery),
				responses: { '200': reply('One page of jobs.', answers.jobList), ...guarded }
			},
			post: {
				operationId: 'createJob',
				summary: 'Take in a job (the intake form as JSON)',
				requestBody: body(makeJobIntake()),
				responses: {
					'201': reply('Created; `Location` names the job.', answers.jobCreated),
					'400': reply('Fields that need attention, one issue per field.'),
					...guarded
				}
			}
		},
		'/api/jobs/{id}': {
			parameters: [pathId('job')],
			get: {
				operationId: 'getJob',
				summary: 'One job with its customer and status history',
				responses: { '200': reply('The job.', answers.jobDetail), '404': reply('No such job.'), ...guarded }
			},
			patch: {
				operationId: 'changeJob',
				summary: 'One change: a status move, the technician, or the consent to open',
				requestBody: body(jobPatch),
				responses: {
					'200': reply('The job after the change.', answers.jobDetail),
					'400': reply('Not one of the three changes.'),
					'404': reply('No such job.'),
					'409': reply('The workflow does not allow this move from the current status.'),
					...guarded
				}
			}
		},
		'/api/jobs/{id}/data': {
			parameters: [pathId('job')],
			put: {
				operationId: 'recordDataOutcome',
				summary: 'What became of the customer’s data: backed up, customer declined, or not possible',
				description:
					'Recorded on the job with a note, who and when, and audited; a later word replaces an earlier one. On a data-first job, a run whose path proves the data reachable holds every step with the hot-air caution and every board-level verdict (409 `data-not-secured` from the events route) until this is recorded.',
				requestBody: body(dataOutcomeInput),
				responses: {
					'200': reply('The job after the change.', answers.jobDetail),
					'400': reply('No outcome, or no note.'),
					'404': reply('No such job.'),
					...guarded
				}
			}
		},
		'/api/jobs/{id}/photos': {
			parameters: [pathId('job')],
			get: {
				operationId: 'listJobPhotos',
				summary: "The job's photos, oldest first",
				responses: { '200': reply('The photos.', answers.photoList), ...guarded }
			},
			post: {
				operationId: 'uploadJobPhoto',
				summary: 'Add a photo to the job',
				requestBody: multipart(photoUploadFields, 'The file and its text fields.'),
				responses: {
					'200': reply('The same file was already filed here (`duplicate: true`).', answers.photoUploaded),
					'201': reply('Stored.', answers.photoUploaded),
					...photoErrors,
					...guarded
				}
			}
		},
		'/api/runs': {
			get: {
				operationId: 'listRuns',
				summary: 'The runs of one job, newest first',
				parameters: query(runListQuery),
				responses: {
					'200': reply('The runs.', runListResponse),
					'400': reply('No job id.', runApiError),
					...guarded
				}
			},
			post: {
				operationId: 'startRun',
				summary: "Start a run of the flow's current published version",
				description: 'The run pins that version. Refused without the customer’s consent to open the phone.',
				requestBody: body(runStartInput),
				responses: {
					'201': reply('Started; `Location` names the run.', runStartedResponse),
					'400': reply('Bad input, or no consent to open yet.', runApiError),
					'404': reply('No such job or flow.', runApiError),
					...guarded
				}
			}
		},
		'/api/runs/{id}': {
			parameters: [pathId('run')],
			get: {
				operationId: 'getRun',
				summary: 'The run, its pinned flow definition and every stored step',
				responses: {
					'200': reply('The run.', runDetail),
					'404': reply('No such run.', runApiError),
					...guarded
				}
			}
		},
		'/api/runs/{id}/events': {
			parameters: [pathId('run')],
			post: {
				operationId: 'recordRunEvent',
				summary: 'Answer, measure or go back at the current step',
				description:
					'Re-validated against the machine of the pinned flow version and stored with the snapshot in one transaction. The same `idempotencyKey` with the same body again is a no-op that returns the first answer; with a different body it is refused with 422.',
				requestBody: body(runEventInput),
				responses: {
					'200': reply('Applied (or replayed).', runEventResult),
					'400': reply('Bad input, or an outcome or reading the step refuses.', runApiError),
					'404': reply('No such run.', runApiError),
					'409': reply(
						'The step is no longer current, the run has finished, or (`code: data-not-secured`) a data-first job must record what became of the data before this step; `state` says where it stands.',
						runApiError
					),
					'422': reply('The idempotency key was already used for a different request.', runApiError),
					...guarded
				}
			}
		},
		'/api/runs/{id}/abandon': {
			parameters: [pathId('run')],
			post: {
				operationId: 'abandonRun',
				summary: 'Stop a run under way, with the reason',
				requestBody: body(runAbandonInput),
				responses: {
					'200': reply('Abandoned.', runAbandonedResponse),
					'400': reply('No reason given.', runApiError),
					'404': reply('No such run.', runApiError),
					'409': reply('The run has already finished.', runApiError),
					...guarded
				}
			}
		},
		'/api/runs/{id}/photos': {
			parameters: [pathId('run')],
			get: {
				operationId: 'listRunPhotos',
				summary: "The run's photos (of one step when asked), oldest first",
				parameters: query(runPhotoListQuery),
				responses: {
					'200': reply('The photos.', answers.photoList),
					'404': reply('No such run.', answers.photoError),
					...guarded
				}
			},
			post: {
				operationId: 'uploadRunPhoto',
				summary: 'Add a photo taken at a step of the run (filed on its job too)',
				requestBody: multipart(
					runPhotoUploadFields,
					'The file, the step it was taken at, and its text fields.'
				),
				responses: {
					'200': reply(
						'The same file was already filed at this step (`duplicate: true`).',
						answers.photoUploaded
					),
					'201': reply('Stored.', answers.photoUploaded),
					...photoErrors,
					...guarded
				}
			}
		},
		'/api/device-models': {
			get: {
				operationId: 'suggestDeviceModels',
				summary: "Suggestions for intake's maker and model fields",
				parameters: query(deviceModelQuery),
				responses: {
					'200': reply('Matching makers and models.', answers.deviceModels),
					'400': reply('Search too long.'),
					...guarded
				}
			}
		}
	};

	return {
		openapi: '3.1.0',
		info: {
			title: 'Tidemark bench API',
			version: '1',
			description:
				'JSON routes of the technician’s bench: jobs, guided runs, photos and device-model suggestions. Every route needs a signed-in staff member; generated from the zod schemas the routes validate with.'
		},
		...(origin ? { servers: [{ url: origin }] } : {}),
		security: [{ session: [] }],
		paths,
		components: {
			schemas: components,
			securitySchemes: {
				session: {
					type: 'apiKey',
					in: 'cookie',
					name: 'authjs.session-token',
					description:
						'The session cookie set by signing in on /signin (`__Secure-authjs.session-token` over HTTPS). Technician role or above.'
				}
			},
			responses: {
				Unauthorised: { description: 'Not signed in.', content: json(answers.apiError) },
				Forbidden: { description: 'Signed in, but the role is too low.', content: json(answers.apiError) }
			}
		}
	};
}

const same = (a: unknown, b: unknown) => JSON.stringify(a) === JSON.stringify(b);

let cached: ReturnType<typeof buildOpenApiDocument> | undefined;
/** The document is the same for the life of the process; build it once. */
export function openApiDocument() {
	return (cached ??= buildOpenApiDocument());
}
