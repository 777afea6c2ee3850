import { render, screen, waitFor } from '@testing-library/svelte';
import { afterEach, describe, expect, it, vi } from 'vitest';
import type { StepHistory } from '$lib/insights/types';
import PastRuns from './PastRuns.svelte';

// Figures: 3 of 5 runs → Wilson 95 % 23.07–88.24 % (worked by hand, see insights.spec.ts).
const history: StepHistory = {
	flowId: 'restart-loop-after-liquid',
	stepId: 'power-on-as-received',
	runs: 5,
	minimum: 5,
	verdicts: [
		{
			verdictCode: 'front-flex-fault',
			verdictTitle: 'Front flex damaged',
			count: 3,
			share: 0.6,
			lower: 0.2307,
			upper: 0.8824
		},
		{
			verdictCode: 'board-fault',
			verdictTitle: 'Board fault',
			count: 2,
			share: 0.4,
			lower: 0.1176,
			upper: 0.7693
		}
	],
	suggestion: null
};

function answer(body: unknown, status = 200) {
	const fetchMock = vi.fn(async () => new Response(JSON.stringify(body), { status }));
	vi.stubGlobal('fetch', fetchMock);
	return fetchMock;
}

afterEach(() => vi.unstubAllGlobals());

describe('PastRuns', () => {
	it('asks for this run and step and lists verdicts with counts and intervals, marked as history', async () => {
		const fetchMock = answer(history);
		render(PastRuns, { runId: 'run-1', stepId: 'power-on-as-received' });
		expect(await screen.findByText('Past runs from this step ended in …')).toBeInTheDocument();
		expect(fetchMock).toHaveBeenCalledWith(
			'/api/runs/run-1/history?step=power-on-as-received',
			expect.anything()
		);
		expect(screen.getByText('History, not advice')).toBeInTheDocument();
		expect(screen.getByText('Front flex damaged')).toBeInTheDocument();
		expect(screen.getByText(/3\/5 · 60 %/)).toBeInTheDocument();
		expect(screen.getByText(/23–88 %/)).toBeInTheDocument();
		expect(screen.queryByTestId('suggested-order')).toBeNull();
	});

	it('shows nothing below the minimum or when the history cannot be loaded', async () => {
		const few = answer({ ...history, runs: 3, verdicts: [] });
		const { unmount } = render(PastRuns, { runId: 'run-1', stepId: 'open' });
		await waitFor(() => expect(few).toHaveBeenCalled());
		expect(screen.queryByTestId('past-runs')).toBeNull();
		unmount();
		answer({ message: 'No run with this id.' }, 404);
		render(PastRuns, { runId: 'run-2', stepId: 'open' });
		expect(await screen.findByText('Past runs could not be loaded.')).toBeInTheDocument();
		expect(screen.queryByTestId('past-runs')).toBeNull();
	});

	it('shows the suggested order and its reason when there is one', async () => {
		answer({
			...history,
			suggestion: {
				order: [
					{ stepId: 'd', title: 'Check D', p: 0.1, minutes: 1, outcomes: ['d'] },
					{ stepId: 'b', title: 'Check B', p: 0.3, minutes: 5, outcomes: ['b'] }
				],
				expectedMinutes: 15.9,
				likeliestFirstMinutes: 24.3,
				reason: 'Checking in decreasing chance per minute averages 15.9 min.'
			}
		});
		render(PastRuns, { runId: 'run-1', stepId: 'first-look' });
		const block = await screen.findByTestId('suggested-order');
		expect(block.querySelectorAll('li')).toHaveLength(2);
		expect(block).toHaveTextContent('Check D (10 % of past runs, 1 min)');
		expect(block).toHaveTextContent('averages 15.9 min');
	});
});
