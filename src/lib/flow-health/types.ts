/**
 * What the flow-health page and the senior's Today read: per step of one flow version, how the
 * runs went there, and the reasons a step stands out. Isomorphic (no zod, no server code).
 */
import type { StepKind } from '$lib/flows/schema';

/** A share with its counts and Wilson 95 % interval (as on Insights). */
export type Share = { count: number; of: number; share: number; lower: number; upper: number };

export type FlagKind = 'revised' | 'slow' | 'abandoned' | 'overturned';
/** Why a step stands out, in words with its counts (e.g. "median 14 min against 5 expected"). */
export type Flag = { kind: FlagKind; reason: string };

export type StepHealth = {
	stepId: string;
	title: string;
	kind: StepKind;
	/** The step's authored `minutes`; null for a verdict without them. */
	expectedMinutes: number | null;
	/** Runs that stood on the step: answered it (an answer kept or revised), stopped there, or ended there. */
	reached: number;
	/** Runs whose answer here still stands (for a verdict: completed runs ending here). */
	answered: number;
	/** Runs that revised an answer here (BACK), over the runs that answered here at all. Null for verdicts. */
	revised: Share | null;
	/** Time on the step over every standing answer (a loop step counts each time round). */
	time: { answers: number; medianMinutes: number; p90Minutes: number } | null;
	/** Abandoned runs that stopped here, over the runs that reached the step. */
	abandoned: Share;
	/** Overturned verdicts whose path passed through here, over the judged verdicts through here. */
	overturned: Share;
	flags: Flag[];
	/** The editor at this step (a new draft from this version) and the step in the version page. */
	links: { edit: string; read: string };
};

export type VersionHealth = {
	flowId: string;
	flowTitle: string;
	version: number;
	status: 'published' | 'retired';
	/** Finished runs of the version (in-progress runs are not counted). */
	runs: number;
	completed: number;
	abandoned: number;
	/** Completed runs whose verdict the repair has judged, and how many of them were overturned. */
	judged: number;
	overturned: number;
	steps: StepHealth[];
	flagged: number;
};

export type FlowHealthResponse = { health: VersionHealth };

/** One flagged step, for the senior's Today: where it is, why, and where to fix it. */
export type Standout = {
	flowId: string;
	flowTitle: string;
	version: number;
	stepId: string;
	stepTitle: string;
	kind: StepKind;
	reasons: string[];
	/** The editor at this step. */
	href: string;
	/** The flow-health page of the version. */
	healthHref: string;
};

export const healthHref = (flowId: string, version: number) => `/flows/${flowId}/health?version=${version}`;
export const editHref = (flowId: string, version: number, stepId: string) =>
	`/flows/${flowId}/drafts/new?from=${version}&step=${encodeURIComponent(stepId)}`;
export const readHref = (flowId: string, version: number, stepId: string) =>
	`/flows/${flowId}/v/${version}#step-${stepId}`;
