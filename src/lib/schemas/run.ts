/**
 * Runs on the wire: what the run routes accept (parsed with these schemas) and what they answer
 * (described by these schemas in /api/openapi.json). The TypeScript shapes in `$lib/runs/types`
 * stay zod-free so the run screen ships no validator; `Same<…>` below keeps the two in step.
 */
import { z } from 'zod';
import { text } from '$lib/schemas/text';
import { flowSchema } from '$lib/flows/schema';
import {
	runStatusValues,
	type RunDetail,
	type RunEventResult,
	type RunState,
	type RunStepRecord,
	type RunSummary
} from '$lib/runs/types';

const key = text('The idempotency key')
	.trim()
	.min(8, 'The idempotency key must be at least 8 characters (a random UUID is ideal).')
	.max(100, 'The idempotency key must be at most 100 characters.');
const stepId = text('The step id').trim().min(1, 'Name the step the answer is for.').max(200);
const notes = text('Notes').max(4000, 'Notes are limited to 4000 characters.').optional();

/** POST /api/runs/:id/events — one event from the run screen. The key makes a retried POST harmless. */
export const runEventInput = z.discriminatedUnion('type', [
	z.object({
		type: z.literal('ANSWER'),
		stepId,
		outcome: z.union([z.number().int(), text('The outcome').min(1)]),
		idempotencyKey: key,
		notes
	}),
	z.object({
		type: z.literal('MEASURE'),
		stepId,
		// Any number here: the step's own domain and ranges decide (with a clear 400).
		value: z.number({ error: 'Enter the reading as a number.' }),
		idempotencyKey: key,
		notes
	}),
	z.object({ type: z.literal('BACK'), stepId, idempotencyKey: key, notes })
]);
export type RunEventInput = z.infer<typeof runEventInput>;

/** POST /api/runs — start a run of the flow's current published version. */
export const runStartInput = z.object({
	jobId: z.uuid('Choose a job.'),
	flowId: text('The flow id').trim().min(1, 'Choose a flow.').max(200)
});
export type RunStartInput = z.infer<typeof runStartInput>;

/** POST /api/runs/:id/abandon. */
export const runAbandonInput = z.object({
	reason: text('The reason')
		.trim()
		.min(3, 'Say in a few words why the run stops here.')
		.max(1000, 'Keep the reason under 1000 characters.')
});

/** GET /api/runs?jobId= */
export const runListQuery = z.object({ jobId: z.uuid('Give the job as ?jobId=<uuid>.') });

// ---- Answers ----

const isoDateTime = z.iso.datetime({ offset: true });
const status = z.enum(runStatusValues);

export const runState = z
	.object({
		id: z.uuid(),
		status,
		currentStep: z.string(),
		snapshot: z.record(z.string(), z.unknown()).meta({
			description: 'The xstate persisted snapshot of the compiled flow machine.'
		}),
		verdictCode: z.string().nullable(),
		dataReachable: z.boolean().nullable(),
		stepEnteredAt: isoDateTime.meta({ description: 'When the current step was reached.' })
	})
	.meta({ id: 'RunState' });

export const runEventResult = z
	.object({ seq: z.number().int(), state: runState })
	.meta({ id: 'RunEventResult' });

const choice = z.object({ index: z.number().int(), label: z.string() });
export const runStepRecord = z
	.object({
		seq: z.number().int(),
		stepId: z.string(),
		kind: z.string(),
		answer: z.union([
			z.object({ outcome: choice }),
			z.object({
				value: z.number(),
				unit: z.string(),
				range: z.object({ index: z.number().int(), label: z.string().nullable() })
			}),
			z.object({ back: z.object({ revised: z.number().int() }) })
		]),
		notes: z.string(),
		enteredAt: isoDateTime,
		answeredAt: isoDateTime,
		supersededAt: isoDateTime.nullable()
	})
	.meta({ id: 'RunStepRecord' });

export const runDetail = runState
	.extend({
		jobId: z.uuid(),
		technicianId: z.uuid(),
		technicianName: z.string().nullable(),
		verdictStep: z.string().nullable(),
		abandonReason: z.string().nullable(),
		startedAt: isoDateTime,
		finishedAt: isoDateTime.nullable(),
		flow: z.object({
			id: z.string(),
			versionId: z.uuid(),
			version: z.number().int(),
			definition: flowSchema
		}),
		steps: z.array(runStepRecord)
	})
	.meta({ id: 'RunDetail' });

export const runSummary = z
	.object({
		id: z.uuid(),
		status,
		currentStep: z.string(),
		verdictCode: z.string().nullable(),
		dataReachable: z.boolean().nullable(),
		startedAt: isoDateTime,
		finishedAt: isoDateTime.nullable(),
		flowId: z.string(),
		flowTitle: z.string(),
		version: z.number().int(),
		technicianName: z.string().nullable(),
		answers: z.number().int()
	})
	.meta({ id: 'RunSummary' });

export const runListResponse = z.object({ runs: z.array(runSummary) });
export const runStartedResponse = z.object({
	id: z.uuid(),
	currentStep: z.string(),
	flowVersionId: z.uuid()
});
export const runAbandonedResponse = z.object({
	id: z.uuid(),
	status: z.literal('abandoned'),
	abandonReason: z.string()
});
export const runApiError = z
	.object({
		message: z.string(),
		code: z.string().optional(),
		issues: z.array(z.object({ path: z.string(), message: z.string() })).optional(),
		state: runState.optional().meta({ description: 'With a 409: where the run stands now.' })
	})
	.meta({ id: 'RunApiError' });

export type RunListResponse = z.infer<typeof runListResponse>;
export type RunStartedResponse = z.infer<typeof runStartedResponse>;
export type RunAbandonedResponse = z.infer<typeof runAbandonedResponse>;

// Compile-time guard: each answer schema describes exactly the type the server returns.
type Same<A, B> = [A] extends [B] ? ([B] extends [A] ? true : false) : false;
const inStep: [
	Same<z.infer<typeof runState>, RunState>,
	Same<z.infer<typeof runEventResult>, RunEventResult>,
	Same<z.infer<typeof runStepRecord>, RunStepRecord>,
	Same<z.infer<typeof runDetail>, RunDetail>,
	Same<z.infer<typeof runSummary>, RunSummary>
] = [true, true, true, true, true];
void inStep;
