import { render, screen } from '@testing-library/svelte';
import userEvent from '@testing-library/user-event';
import { describe, expect, it, vi } from 'vitest';
import { checkFlow } from '$lib/flows/check';
import { setExit } from '$lib/flows/edit';
import { tinyFlow } from '$lib/flows/fixture';
import ProblemList from './ProblemList.svelte';

describe('ProblemList', () => {
	it('says when the check passes', () => {
		render(ProblemList, { problems: [], onjump: vi.fn() });
		expect(screen.getByRole('heading')).toHaveTextContent('No problems: the check passes');
	});

	it('jumps to the step of a problem on click and on Enter', async () => {
		const broken = setExit(tinyFlow(), 'draw', 1, { next: 'nowhere' });
		if (!broken.ok) throw new Error(broken.message);
		const problems = checkFlow(broken.definition).problems;
		const onjump = vi.fn();
		render(ProblemList, { problems, onjump });
		expect(screen.getByRole('heading')).toHaveTextContent('2 problems');
		const user = userEvent.setup();
		const dangling = screen.getByRole('button', { name: /Leads nowhere draw/ });
		await user.click(dangling);
		expect(onjump).toHaveBeenLastCalledWith(
			expect.objectContaining({ code: 'unknown-target', step: 'draw' })
		);
		// "short" is no longer reached by anything.
		screen.getByRole('button', { name: /Unreachable short/ }).focus();
		await user.keyboard('{Enter}');
		expect(onjump).toHaveBeenLastCalledWith(
			expect.objectContaining({ code: 'unreachable-step', step: 'short' })
		);
	});
});
