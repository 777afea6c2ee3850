import { describe, expect, it } from 'vitest';
import type { FlowDefinition } from '$lib/flows/schema';
import { stepHistory } from './aggregate';
import type { Fact, Labels } from './store';

// The worked example of trade-reference.md §4 (computed there by brute force over all 24 orders):
// p = .40/.30/.20/.10, c = 20/5/4/1 min → best order D, B, C, A at 15.9 min; likeliest first 24.3.
// Here p comes from history: 10 runs answered the symptom step 4/3/2/1 times with outcomes leading
// to tests A/B/C/D, and every run reached a verdict.
const test = (title: string, minutes: number) => ({
	kind: 'test' as const,
	title,
	minutes,
	outcomes: [{ label: 'Found', next: 'done' }]
});
const definition = {
	id: 'fixture-flow',
	title: 'Fixture flow',
	summary: '',
	symptoms: [],
	start: 'first-look',
	steps: {
		'first-look': {
			kind: 'symptom',
			title: 'What do you see?',
			minutes: 2,
			outcomes: [
				{ label: 'a', next: 'test-a' },
				{ label: 'b', next: 'test-b' },
				{ label: 'c', next: 'test-c' },
				{ label: 'd', next: 'test-d' }
			]
		},
		'test-a': test('Check A', 20),
		'test-b': test('Check B', 5),
		'test-c': test('Check C', 4),
		'test-d': test('Check D', 1),
		done: {
			kind: 'verdict',
			title: 'Done',
			verdict: { code: 'done', severity: 'repair', repair: '', risks: '' }
		}
	}
} as unknown as FlowDefinition;

const labels: Labels = {
	flowTitle: () => 'Fixture flow',
	stepTitle: (_f, s) => s,
	verdictTitle: (_f, c) => c,
	technicianName: () => 'x',
	definition: () => definition,
	technicians: []
};

const facts: Fact[] = [0, 0, 0, 0, 1, 1, 1, 2, 2, 3].map((outcome, i) => ({
	runId: `r${i}`,
	seq: i,
	jobId: `j${i}`,
	flowId: 'fixture-flow',
	version: 1,
	status: 'completed',
	verdictCode: 'done',
	deviceModel: 'Corvana Tern 5',
	technicianId: 't',
	startedAt: 0,
	finishedAt: 1,
	durationS: 60,
	stepIds: ['first-look', `test-${'abcd'[outcome]}`],
	outcomes: [outcome, 0],
	dwellS: [60, 60],
	abandonReason: null,
	abandonStep: null,
	confirmed: null,
	confirmationNote: null,
	confirmedAt: null
}));

describe('suggested order at a step that branches into tests', () => {
	it('orders the tests by p / cost and reports the expected minutes of trade-reference §4', () => {
		const h = stepHistory(facts, 'fixture-flow', 'first-look', labels);
		expect(h.runs).toBe(10);
		expect(h.suggestion!.order.map((c) => c.stepId)).toEqual(['test-d', 'test-b', 'test-c', 'test-a']);
		expect(h.suggestion!.order.map((c) => c.p)).toEqual([0.1, 0.3, 0.2, 0.4]);
		expect(h.suggestion!.expectedMinutes).toBe(15.9);
		expect(h.suggestion!.likeliestFirstMinutes).toBe(24.3);
		expect(h.suggestion!.reason).toMatch(/“Check D” first/);
	});

	it('orders the alternative tests a test step leads to, leaving out a repeat of the step itself', () => {
		// "Isolation" (a test step): 6 of 10 runs went on to the 10-minute check, 3 to the 2-minute
		// one, 1 repeated the step. p/c = .06 vs .15 per minute → the short check first.
		const isolate = {
			kind: 'test' as const,
			title: 'Isolation',
			minutes: 5,
			outcomes: [
				{ label: 'long', next: 'test-long' },
				{ label: 'short', next: 'test-short' },
				{ label: 'again', next: 'isolate' }
			]
		};
		const def = {
			...definition,
			steps: {
				...definition.steps,
				isolate,
				'test-long': test('Long check', 10),
				'test-short': test('Short check', 2)
			}
		} as unknown as FlowDefinition;
		const runs: Fact[] = [0, 0, 0, 0, 0, 0, 1, 1, 1, 2].map((outcome, i) => ({
			...facts[i],
			stepIds: ['isolate', ['test-long', 'test-short', 'isolate'][outcome]],
			outcomes: [outcome, 0]
		}));
		const h = stepHistory(runs, 'fixture-flow', 'isolate', { ...labels, definition: () => def });
		expect(h.suggestion!.order.map((c) => [c.stepId, c.p])).toEqual([
			['test-short', 0.3],
			['test-long', 0.6]
		]);
		// Kadane & Simon (1977), trade-reference §4: Σ cost_k · (1 − Σ_{j<k} p_j) = 2 + 10 · .7 = 9;
		// likeliest (long) first: 10 + 2 · .4 = 10.8.
		expect(h.suggestion!.expectedMinutes).toBe(9);
		expect(h.suggestion!.likeliestFirstMinutes).toBe(10.8);
		expect(h.suggestion!.reason).toMatch(/“Short check” first/);
	});

	it('offers no order for a step that leads to one test only, nor below five runs', () => {
		expect(stepHistory(facts, 'fixture-flow', 'test-a', labels).suggestion).toBeNull();
		expect(stepHistory(facts.slice(0, 4), 'fixture-flow', 'first-look', labels).suggestion).toBeNull();
	});
});
