/**
 * Data first: on a job whose customer cares more about the data than the phone, once a run proves
 * the data reachable, the data is secured (or the customer declines, or it cannot be done) before
 * any step that risks it. Isomorphic: the run screen asks with these rules and the server enforces
 * the same ones (src/lib/server/runs/data-secure.ts).
 */
import type { FlowDefinition, Step } from '$lib/flows/schema';

export const dataOutcomes = ['backed-up', 'declined', 'not-possible'] as const;
export type DataOutcome = (typeof dataOutcomes)[number];

/** The bench's words for each outcome (buttons, job page, staff report). */
export const dataOutcomeLabels: Record<DataOutcome, string> = {
	'backed-up': 'Backed up',
	declined: 'Customer declined',
	'not-possible': 'Not possible'
};

/** What the note should say for each outcome: a hint under the note field. */
export const dataOutcomeNoteHints: Record<DataOutcome, string> = {
	'backed-up': 'Where the backup went (e.g. the customer’s own drive, the shop’s backup disk).',
	declined: 'What the customer said, and when.',
	'not-possible': 'Why not (e.g. the phone locks up before the copy finishes).'
};

/**
 * A step that puts the data at risk: it carries the hot-air caution (heat on the board can finish a
 * weak part or the cell that keeps the phone alive), or it is a board-level verdict (the repair that
 * follows works on the board itself). Common practice, no published source.
 */
export function needsDataSecured(step: Step | undefined): boolean {
	if (!step) return false;
	if (step.cautions?.includes('hot-air')) return true;
	return step.kind === 'verdict' && step.verdict.severity === 'board-level';
}

/** The job's side of the gate. */
export type DataFirstJob = { dataFirst: boolean; dataOutcome: DataOutcome | null };

/** True when the run must ask for the data to be secured now. */
export function dataSecureDue(job: DataFirstJob, dataReachable: boolean | null): boolean {
	return job.dataFirst && job.dataOutcome === null && dataReachable === true;
}

/**
 * One event's move: from the step it was given at to the step it leads to; `reachable` is what the
 * run's path proves about the data once the event is applied. A BACK is never held: going back
 * takes no risk, and answering the step it returns to is held in its turn.
 */
export type DataMove = { from: string; to: string; back: boolean; reachable: boolean | null };

/**
 * The step that holds this move until the data is secured, or null when the move may go ahead: a
 * data-first job with reachable data and no outcome on record may neither answer at nor move into
 * a step that needs the data secured.
 */
export function dataGateStep(
	definition: FlowDefinition,
	move: DataMove,
	job: DataFirstJob
): { id: string; title: string } | null {
	if (move.back || !dataSecureDue(job, move.reachable)) return null;
	for (const id of [move.from, move.to]) {
		const step = definition.steps[id];
		if (needsDataSecured(step)) return { id, title: step.title };
	}
	return null;
}

/** The refusal both sides show, naming the step that waits. */
export function dataGateMessage(title: string): string {
	return `Secure the customer’s data first: record whether it was backed up, the customer declined, or a backup was not possible, before “${title}”.`;
}

/**
 * What became of the data, for the report: only what is on record. `reachable` is what the job's
 * runs proved (true when any run reached the data, false when one found it unreachable and none
 * reached it, null when none said). Nothing is said on a job that is not data-first and has no
 * outcome and no run that said anything about the data.
 */
export type DataFate = 'backed-up' | 'declined' | 'not-possible' | 'reachable' | 'not-reached';

export function dataFate(job: DataFirstJob, reachable: boolean | null): DataFate | null {
	if (job.dataOutcome) return job.dataOutcome;
	if (reachable === true) return 'reachable';
	if (reachable === false || job.dataFirst) return 'not-reached';
	return null;
}

/** The customer's sentence for each fate. */
export const dataFateForCustomer: Record<DataFate, string> = {
	'backed-up': 'Your data was backed up.',
	declined: 'You declined a backup of your data.',
	'not-possible': 'A backup of your data was not possible.',
	reachable: 'Your data could be reached during the diagnosis; no backup is on record.',
	'not-reached': 'Your data was not reached during the diagnosis.'
};
