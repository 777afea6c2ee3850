import { render, screen, within } from '@testing-library/svelte';
import { describe, expect, it } from 'vitest';
import { wilsonInterval } from '$lib/domain/stats';
import type { Share, StepHealth, VersionHealth } from '$lib/flow-health/types';
import HealthTable from './HealthTable.svelte';

const share = (count: number, of: number): Share => ({
	count,
	of,
	share: of ? count / of : 0,
	...wilsonInterval(count, of)
});
const step = (over: Partial<StepHealth> & Pick<StepHealth, 'stepId' | 'title'>): StepHealth => ({
	kind: 'test',
	expectedMinutes: 5,
	reached: 39,
	answered: 39,
	revised: share(2, 39),
	time: { answers: 39, medianMinutes: 5, p90Minutes: 8 },
	abandoned: share(0, 39),
	overturned: share(1, 30),
	flags: [],
	links: {
		edit: `/flows/demo-flow/drafts/new?from=3&step=${over.stepId}`,
		read: `/flows/demo-flow/v/3#step-${over.stepId}`
	},
	...over
});
const health: VersionHealth = {
	flowId: 'demo-flow',
	flowTitle: 'Demo flow',
	version: 3,
	status: 'published',
	runs: 40,
	completed: 31,
	abandoned: 9,
	judged: 30,
	overturned: 5,
	flagged: 1,
	steps: [
		step({ stepId: 'look-first', title: 'Look at the board' }),
		step({
			stepId: 'measure-draw',
			title: 'Measure the standby draw',
			kind: 'measure',
			revised: share(12, 39),
			time: { answers: 39, medianMinutes: 14, p90Minutes: 22.25 },
			flags: [
				{ kind: 'revised', reason: 'answers revised in 31 % of runs (12/39, 95 % 19–46 %)' },
				{ kind: 'slow', reason: 'median 14 min against 5 expected (39 answers)' }
			]
		})
	]
};

describe('HealthTable', () => {
	it('marks a flagged step with an icon and the words "Stands out", its reasons, and a link to the editor at the step', () => {
		render(HealthTable, { health });
		const rows = screen.getAllByTestId('health-row');
		expect(rows).toHaveLength(2);
		const flagged = rows[1];
		expect(flagged).toHaveAttribute('data-flagged', 'true');
		const flag = within(flagged).getByTestId('flag');
		expect(flag).toHaveTextContent('Stands out');
		expect(flag.querySelector('svg')).not.toBeNull();
		expect(within(flag).getByText('answers revised in 31 % of runs (12/39, 95 % 19–46 %)')).toBeVisible();
		expect(within(flag).getByText('median 14 min against 5 expected (39 answers)')).toBeVisible();
		const edit = within(flagged).getByRole('link', { name: 'Edit at this step: Measure the standby draw' });
		expect(edit).toHaveAttribute('href', '/flows/demo-flow/drafts/new?from=3&step=measure-draw');
		expect(within(flagged).getByRole('link', { name: 'Measure the standby draw' })).toHaveAttribute(
			'href',
			'/flows/demo-flow/v/3#step-measure-draw'
		);
	});

	it('shows the figures with their counts and intervals; an unflagged row has no flag', () => {
		render(HealthTable, { health });
		const [plain, flagged] = screen.getAllByTestId('health-row');
		expect(plain).toHaveAttribute('data-flagged', 'false');
		expect(within(plain).queryByTestId('flag')).toBeNull();
		// 12/39 = 30.8 %, Wilson 95 % 18.6–46.4 % (computed by domain/stats, checked there against Newcombe 1998).
		expect(flagged).toHaveTextContent('31 %');
		expect(flagged).toHaveTextContent('12/39 runs 95 % 19–46 %');
		expect(flagged).toHaveTextContent('14 min');

		expect(flagged).toHaveTextContent('p90 22.3 · expected 5');
		expect(flagged).toHaveTextContent('39 answers');
		expect(plain).toHaveTextContent('1 of 5 overturned');
		expect(plain).toHaveTextContent('Abandoned herenone');
	});
});
