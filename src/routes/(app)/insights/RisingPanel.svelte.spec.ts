import { render, screen } from '@testing-library/svelte';
import { describe, expect, it } from 'vitest';
import { risingVerdicts } from '$lib/insights/rising';
import RisingPanel from './RisingPanel.svelte';

// The panel only words what $lib/insights/rising worked out (its spec checks the statistics).
const rise = (code: string, k: number, n: number, earlier: number, clear: boolean) => ({
	code,
	share: k / n,
	now: { lower: 0.2553, upper: 0.3662 }, // 81/263, Newcombe (1998), Wilson column
	earlier,
	then: { lower: 0.17, upper: 0.23 },
	k,
	n,
	clear
});
const titleOf = (code: string) => ({ corrosion: 'Corrosion under the charge connector' })[code] ?? code;

describe('RisingPanel', () => {
	it('words each rise with its figures and whether chance could explain it', () => {
		render(RisingPanel, {
			rising: [rise('corrosion', 81, 263, 0.2, true), rise('short', 15, 148, 0.08, false)],
			titleOf
		});
		const items = screen.getAllByRole('listitem');
		expect(items[0]).toHaveTextContent('Corrosion under the charge connector');
		expect(items[0]).toHaveTextContent('(81/263, 95 %');
		expect(items[0]).toHaveTextContent('The rise is larger than chance would usually give.');
		expect(items[1]).toHaveTextContent('short');
		expect(items[1]).toHaveTextContent('Could still be chance: the intervals overlap.');
	});

	it('shows nothing when no verdict is rising', () => {
		render(RisingPanel, { rising: risingVerdicts(undefined), titleOf });
		expect(screen.queryByRole('heading', { name: /Rising/ })).toBeNull();
	});
});
