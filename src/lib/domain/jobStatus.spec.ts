import { describe, expect, it } from 'vitest';
import {
	assertTransition,
	canTransition,
	isFinalStatus,
	jobStatusSchema,
	jobStatuses,
	nextStatuses,
	statusLabels,
	type JobStatus
} from './jobStatus';

// The expected transitions are the product's rules (issue 4 and this module's brief), written out
// here by hand rather than derived from the implementation's table.
const forward: [JobStatus, JobStatus][] = [
	['received', 'diagnosing'],
	['diagnosing', 'awaiting-approval'],
	['awaiting-approval', 'repairing'],
	['repairing', 'testing'],
	['testing', 'ready'],
	['ready', 'collected']
];
const back: [JobStatus, JobStatus][] = [
	['testing', 'diagnosing'],
	['awaiting-approval', 'diagnosing'],
	['repairing', 'diagnosing'],
	// A declined quote: the phone goes back to the customer unrepaired.
	['awaiting-approval', 'ready']
];
const nonFinal: JobStatus[] = [
	'received',
	'diagnosing',
	'awaiting-approval',
	'repairing',
	'testing',
	'ready'
];
const allowed = new Set(
	[...forward, ...back, ...nonFinal.map((s): [JobStatus, JobStatus] => [s, 'cancelled'])].map(String)
);

describe('job status transitions', () => {
	it.each(forward)('forward: %s → %s', (from, to) => {
		expect(canTransition(from, to)).toBe(true);
	});

	it('a failed function test reopens diagnosis; awaiting approval can go back to diagnosis', () => {
		expect(canTransition('testing', 'diagnosing')).toBe(true);
		expect(canTransition('awaiting-approval', 'diagnosing')).toBe(true);
	});

	it.each(nonFinal)('%s can be cancelled', (from) => {
		expect(canTransition(from, 'cancelled')).toBe(true);
	});

	it('collected and cancelled are final', () => {
		for (const final of ['collected', 'cancelled'] as const) {
			expect(isFinalStatus(final)).toBe(true);
			expect(nextStatuses(final)).toEqual([]);
			for (const to of jobStatuses) expect(canTransition(final, to)).toBe(false);
		}
		for (const status of nonFinal) expect(isFinalStatus(status)).toBe(false);
	});

	it('every other pair of statuses is refused (all 64 pairs checked), including skipping ahead and staying put', () => {
		for (const from of jobStatuses) {
			for (const to of jobStatuses) {
				expect(canTransition(from, to), `${from} → ${to}`).toBe(allowed.has(String([from, to])));
			}
		}
		expect(canTransition('received', 'repairing')).toBe(false);
		expect(canTransition('repairing', 'repairing')).toBe(false);
	});

	it('nextStatuses lists exactly the allowed moves, usual next step first', () => {
		for (const from of jobStatuses) {
			const expected = jobStatuses.filter((to) => allowed.has(String([from, to])));
			expect([...nextStatuses(from)].sort()).toEqual([...expected].sort());
		}
		expect(nextStatuses('testing')[0]).toBe('ready');
	});

	it('unknown statuses get no moves instead of an exception (e.g. a stale client)', () => {
		expect(nextStatuses('archived' as JobStatus)).toEqual([]);
		expect(nextStatuses('toString' as JobStatus)).toEqual([]);
		expect(canTransition('received', 'archived' as JobStatus)).toBe(false);
	});

	it('assertTransition explains a refused move', () => {
		expect(() => assertTransition('received', 'diagnosing')).not.toThrow();
		expect(() => assertTransition('received', 'ready')).toThrow(/allowed: diagnosing, cancelled/);
		expect(() => assertTransition('collected', 'diagnosing')).toThrow(/final/);
	});

	it('the zod schema and labels cover every status', () => {
		for (const status of jobStatuses) {
			expect(jobStatusSchema.parse(status)).toBe(status);
			expect(statusLabels[status].length).toBeGreaterThan(0);
		}
		expect(jobStatusSchema.safeParse('lost').success).toBe(false);
	});
});
