/**
 * The bench's queue: which open job to pick up first, and which jobs broke their promised date.
 * Pure and isomorphic, so Today, the job list's tests and the SQL mirror in
 * `$lib/server/jobs/urgency-sql.ts` agree on one rule.
 *
 * COMMON PRACTICE, NO PUBLISHED SOURCE: corrosion does not wait, so the urgency of cleaning
 * (urgencyHint: the liquid's kind and the hours since contact, as of now) decides first; among equal
 * urgency, the phone that has waited longer since the liquid goes first, then the earlier promised
 * date, then the older job. The ordering is our own rule of thumb, not a measured one.
 */
import { urgencyHint, type UrgencyLevel } from './urgency';
import type { LiquidKind } from './liquid';
import type { JobStatus } from './jobStatus';

export const urgencyRank: Record<UrgencyLevel, number> = { low: 0, elevated: 1, high: 2, critical: 3 };

/** Statuses in which the shop still owes the customer work: a promise can be broken only here. */
export const openStatuses = ['received', 'diagnosing', 'awaiting-approval', 'repairing', 'testing'] as const;

export function isOpen(status: JobStatus): boolean {
	return (openStatuses as readonly string[]).includes(status);
}

export type QueueItem = {
	number: number;
	liquid: LiquidKind;
	exposedAt: Date | null;
	promisedAt: Date | null;
};

const HOUR = 3_600_000;

/** Hours since the liquid, as of `now`; null when the customer does not know. A clock ahead counts as 0. */
export function hoursSince(exposedAt: Date | null, now: Date): number | null {
	return exposedAt ? Math.max(0, (now.getTime() - exposedAt.getTime()) / HOUR) : null;
}

/** The urgency of cleaning as of `now` (it rises while the phone waits). */
export function urgencyAt(item: Pick<QueueItem, 'liquid' | 'exposedAt'>, now: Date): UrgencyLevel {
	return urgencyHint(hoursSince(item.exposedAt, now), item.liquid).level;
}

/** Negative when `a` should be picked up before `b`. */
export function compareUrgency(a: QueueItem, b: QueueItem, now: Date): number {
	const level = urgencyRank[urgencyAt(b, now)] - urgencyRank[urgencyAt(a, now)];
	if (level) return level;
	// Longer since the liquid first; an unknown time after every known one.
	const ea = a.exposedAt?.getTime() ?? Infinity;
	const eb = b.exposedAt?.getTime() ?? Infinity;
	if (ea !== eb) return ea < eb ? -1 : 1;
	// Earlier promise first; no promise after every promise.
	const pa = a.promisedAt?.getTime() ?? Infinity;
	const pb = b.promisedAt?.getTime() ?? Infinity;
	if (pa !== pb) return pa < pb ? -1 : 1;
	return a.number - b.number;
}

/** A copy of `items` in the order to pick them up. */
export function byUrgency<T extends QueueItem>(items: readonly T[], now: Date): T[] {
	return [...items].sort((a, b) => compareUrgency(a, b, now));
}

/**
 * Overdue: the promised date has passed and the phone is not ready yet (ready, collected and
 * cancelled jobs kept or closed their promise). A job without a promised date is never overdue.
 */
export function isOverdue(job: { promisedAt: Date | null; status: JobStatus }, now: Date): boolean {
	return job.promisedAt !== null && job.promisedAt.getTime() < now.getTime() && isOpen(job.status);
}

/**
 * The promised instant for a calendar day the customer was told: the end of that day in the
 * shop's zone (`tzOffsetMin` is the browser's getTimezoneOffset, UTC − local), so the promise
 * holds all that day.
 */
export function endOfLocalDay(day: string, tzOffsetMin: number): Date {
	const [y, m, d] = day.split('-').map(Number);
	return new Date(Date.UTC(y, m - 1, d + 1) + tzOffsetMin * 60_000 - 1000);
}

/** The calendar day (YYYY-MM-DD) `days` after `now` in the zone of `tzOffsetMin`. */
export function localDayAfter(now: Date, days: number, tzOffsetMin: number): string {
	const local = new Date(now.getTime() - tzOffsetMin * 60_000 + days * 86_400_000);
	return local.toISOString().slice(0, 10);
}
