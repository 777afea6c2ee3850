/**
 * Run shapes shared by the API, the run screen and the job page. Isomorphic: no server imports.
 */
import { z } from 'zod';
import type { FlowDefinition } from '$lib/flows/schema';

export const runStatusValues = ['in-progress', 'completed', 'abandoned'] as const;
export type RunStatusValue = (typeof runStatusValues)[number];

const key = z
	.string()
	.trim()
	.min(8, 'The idempotency key must be at least 8 characters (a random UUID is ideal).')
	.max(100, 'The idempotency key must be at most 100 characters.');
const stepId = z.string().trim().min(1, 'Name the step the answer is for.').max(200);
const notes = z.string().max(4000, 'Notes are limited to 4000 characters.').optional();

/** One event from the run screen. The key makes a retried POST harmless. */
export const runEventInput = z.discriminatedUnion('type', [
	z.object({
		type: z.literal('ANSWER'),
		stepId,
		outcome: z.union([z.number().int(), z.string().min(1)]),
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

export const runStartInput = z.object({
	jobId: z.uuid('Choose a job.'),
	flowId: z.string().trim().min(1, 'Choose a flow.').max(200)
});
export type RunStartInput = z.infer<typeof runStartInput>;

export const runAbandonInput = z.object({
	reason: z
		.string()
		.trim()
		.min(3, 'Say in a few words why the run stops here.')
		.max(1000, 'Keep the reason under 1000 characters.')
});

/** Where a run stands: what the server answers to every event and sends with a 409. */
export type RunState = {
	id: string;
	status: RunStatusValue;
	currentStep: string;
	/** The xstate persisted snapshot of the compiled flow machine. */
	snapshot: Record<string, unknown>;
	verdictCode: string | null;
	dataReachable: boolean | null;
	/** When the current step was reached (ISO), for the elapsed timer. */
	stepEnteredAt: string;
};

export type RunEventResult = { seq: number; state: RunState };

export type RunStepRecord = {
	seq: number;
	stepId: string;
	kind: string;
	answer:
		| { outcome: { index: number; label: string } }
		| { value: number; unit: string; range: { index: number; label: string | null } }
		| { back: { revised: number } };
	notes: string;
	enteredAt: string;
	answeredAt: string;
	supersededAt: string | null;
};

export type RunDetail = RunState & {
	jobId: string;
	technicianId: string;
	technicianName: string | null;
	verdictStep: string | null;
	abandonReason: string | null;
	startedAt: string;
	finishedAt: string | null;
	flow: { id: string; versionId: string; version: number; definition: FlowDefinition };
	steps: RunStepRecord[];
};

export type RunSummary = {
	id: string;
	status: RunStatusValue;
	currentStep: string;
	verdictCode: string | null;
	dataReachable: boolean | null;
	startedAt: string;
	finishedAt: string | null;
	flowId: string;
	flowTitle: string;
	version: number;
	technicianName: string | null;
	answers: number;
};

export const runStatusLabels: Record<RunStatusValue, string> = {
	'in-progress': 'In progress',
	completed: 'Verdict reached',
	abandoned: 'Abandoned'
};
