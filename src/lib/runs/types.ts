/**
 * Run shapes shared by the API, the run screen and the job page. Isomorphic and free of zod, so the
 * run screen ships no validator.
 */
import type { FlowDefinition } from '$lib/flows/schema';

// The zod schemas of run requests and answers live in $lib/schemas/run (server and API document).
export type { RunEventInput, RunStartInput } from '$lib/schemas/run';

export const runStatusValues = ['in-progress', 'completed', 'abandoned'] as const;
export type RunStatusValue = (typeof runStatusValues)[number];

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
