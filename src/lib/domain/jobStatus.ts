/**
 * Where a job stands. One table holds every allowed move so the API, the job page and the tests all
 * agree; a move not in the table is refused rather than silently accepted.
 *
 * received → diagnosing → awaiting-approval → repairing → testing → ready → collected
 *
 * Moves back: testing → diagnosing (a failed function test reopens diagnosis) and
 * awaiting-approval → diagnosing (new evidence or a customer question before approval means the
 * verdict is looked at again); repairing → diagnosing (the repair uncovers another fault).
 * awaiting-approval → ready: the customer declined the quote and collects the phone unrepaired.
 * Any job that is not finished can be cancelled. `collected` and
 * `cancelled` are final: a returning phone is a new job, so its history stays readable.
 */
import { z } from 'zod';

export const jobStatuses = [
	'received',
	'diagnosing',
	'awaiting-approval',
	'repairing',
	'testing',
	'ready',
	'collected',
	'cancelled'
] as const;
export type JobStatus = (typeof jobStatuses)[number];
export const jobStatusSchema = z.enum(jobStatuses);

export const statusLabels: Record<JobStatus, string> = {
	received: 'Received',
	diagnosing: 'Diagnosing',
	'awaiting-approval': 'Awaiting approval',
	repairing: 'Repairing',
	testing: 'Testing',
	ready: 'Ready to collect',
	collected: 'Collected',
	cancelled: 'Cancelled'
};

const FINAL: ReadonlySet<JobStatus> = new Set(['collected', 'cancelled']);

/** Allowed next statuses, in the order a screen should offer them (the usual next step first). */
const NEXT: Record<JobStatus, readonly JobStatus[]> = {
	received: ['diagnosing', 'cancelled'],
	diagnosing: ['awaiting-approval', 'cancelled'],
	'awaiting-approval': ['repairing', 'diagnosing', 'ready', 'cancelled'],
	repairing: ['testing', 'diagnosing', 'cancelled'],
	testing: ['ready', 'diagnosing', 'cancelled'],
	ready: ['collected', 'cancelled'],
	collected: [],
	cancelled: []
};

export function isFinalStatus(status: JobStatus): boolean {
	return FINAL.has(status);
}

/** The statuses a job may move to from `from` (empty for final statuses and unknown input). */
export function nextStatuses(from: JobStatus): readonly JobStatus[] {
	return Object.hasOwn(NEXT, from) ? NEXT[from] : [];
}

/** True only for a move in the table; staying put is not a transition. */
export function canTransition(from: JobStatus, to: JobStatus): boolean {
	return nextStatuses(from).includes(to);
}

/** For server code: throws a clear error for a move that is not allowed. */
export function assertTransition(from: JobStatus, to: JobStatus): void {
	if (!canTransition(from, to)) {
		const allowed = nextStatuses(from);
		throw new Error(
			`A job cannot go from "${from}" to "${to}"` +
				(allowed.length ? ` (allowed: ${allowed.join(', ')})` : ` ("${from}" is final)`)
		);
	}
}
