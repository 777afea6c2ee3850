import { describe, expect, it } from 'vitest';
import { byUrgency, endOfLocalDay, isOverdue, localDayAfter, urgencyAt, type QueueItem } from './queue';

// Every expected value below is worked out by hand from the rule in queue.ts and urgency.ts
// (common practice, no published source): level = min(3, liquid weight + wait band), liquid weight
// fresh 0 · chlorinated/other/unknown 1 · salt/sugary 2; wait band < 6 h 0 · < 24 h 1 · < 72 h 2 ·
// later 3 · unknown 1.
const now = new Date('2026-12-04T12:00:00Z');
const hoursAgo = (h: number) => new Date(now.getTime() - h * 3_600_000);
const item = (
	number: number,
	liquid: QueueItem['liquid'],
	h: number | null,
	promised?: string
): QueueItem => ({
	number,
	liquid,
	exposedAt: h === null ? null : hoursAgo(h),
	promisedAt: promised ? new Date(promised) : null
});

describe('urgency order (common practice, no published source)', () => {
	it('puts salt after 30 h (2 + 2 → critical) before fresh after 80 h (0 + 3 → critical) only by the wait', () => {
		const salt = item(1, 'salt', 30);
		const fresh = item(2, 'fresh', 80);
		expect(urgencyAt(salt, now)).toBe('critical');
		expect(urgencyAt(fresh, now)).toBe('critical');
		// Same level: the longer wait (80 h) goes first.
		expect(byUrgency([salt, fresh], now).map((j) => j.number)).toEqual([2, 1]);
	});

	it('orders by level first: sugary 3 h (2 + 0 = high) before fresh 20 h (0 + 1 = elevated)', () => {
		const sugary = item(1, 'sugary', 3);
		const fresh = item(2, 'fresh', 20);
		expect(urgencyAt(sugary, now)).toBe('high');
		expect(urgencyAt(fresh, now)).toBe('elevated');
		expect(byUrgency([fresh, sugary], now).map((j) => j.number)).toEqual([1, 2]);
	});

	it('treats an unknown time as 6–24 h for the level, and after the known times of that level', () => {
		const unknownFresh = item(1, 'fresh', null); // 0 + 1 = elevated
		const fresh10 = item(2, 'fresh', 10); // 0 + 1 = elevated
		const fresh2 = item(3, 'fresh', 2); // 0 + 0 = low
		expect(urgencyAt(unknownFresh, now)).toBe('elevated');
		expect(byUrgency([fresh2, unknownFresh, fresh10], now).map((j) => j.number)).toEqual([2, 1, 3]);
	});

	it('breaks a tie of level and wait by the earlier promised date, then the older job', () => {
		const a = item(7, 'chlorinated', 30, '2026-12-06T23:59:59Z');
		const b = item(5, 'chlorinated', 30, '2026-12-05T23:59:59Z');
		const c = item(4, 'chlorinated', 30);
		const d = item(3, 'chlorinated', 30);
		expect(byUrgency([a, b, c, d], now).map((j) => j.number)).toEqual([5, 7, 3, 4]);
	});

	it('keeps the order live: the same fresh-water phone rises from low to elevated as 6 h pass', () => {
		const job = { liquid: 'fresh' as const, exposedAt: hoursAgo(5) };
		expect(urgencyAt(job, now)).toBe('low');
		expect(urgencyAt(job, new Date(now.getTime() + 2 * 3_600_000))).toBe('elevated');
	});

	it('counts a contact time a little in the future (a clock ahead) as 0 h, not an error', () => {
		expect(urgencyAt({ liquid: 'salt', exposedAt: new Date(now.getTime() + 60_000) }, now)).toBe('high');
	});
});

describe('overdue rule', () => {
	const promisedAt = new Date('2026-12-03T23:59:59Z');
	it('is overdue once the promised day is over and the phone is not ready', () => {
		expect(isOverdue({ promisedAt, status: 'repairing' }, now)).toBe(true);
		expect(isOverdue({ promisedAt, status: 'received' }, now)).toBe(true);
	});
	it('is not overdue on the promised day itself', () => {
		expect(isOverdue({ promisedAt, status: 'diagnosing' }, new Date('2026-12-03T23:00:00Z'))).toBe(false);
	});
	it('a ready, collected or cancelled job kept or closed its promise', () => {
		for (const status of ['ready', 'collected', 'cancelled'] as const)
			expect(isOverdue({ promisedAt, status }, now)).toBe(false);
	});
	it('a job without a promised date is never overdue', () => {
		expect(isOverdue({ promisedAt: null, status: 'testing' }, now)).toBe(false);
	});
});

describe('promised day', () => {
	it('ends at 23:59:59 local: UTC+1 (offset −60) ends at 22:59:59 UTC', () => {
		expect(endOfLocalDay('2026-12-07', -60).toISOString()).toBe('2026-12-07T22:59:59.000Z');
		expect(endOfLocalDay('2026-12-07', 0).toISOString()).toBe('2026-12-07T23:59:59.000Z');
	});
	it('counts the turnaround in local calendar days: 23:30 UTC is already the next day at UTC+1', () => {
		expect(localDayAfter(new Date('2026-12-04T23:30:00Z'), 3, -60)).toBe('2026-12-08');
		expect(localDayAfter(new Date('2026-12-04T23:30:00Z'), 3, 0)).toBe('2026-12-07');
	});
});
