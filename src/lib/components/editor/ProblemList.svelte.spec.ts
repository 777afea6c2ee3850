import { render, screen } from '@testing-library/svelte';
import userEvent from '@testing-library/user-event';
import { describe, expect, it, vi } from 'vitest';
import { checkFlow, PROBLEM_CODES } from '$lib/flows/check';
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

	it('names every problem code in words, the trade rules too', () => {
		const problems = PROBLEM_CODES.map((code) => ({ code, step: 's', message: 'Some message to read.' }));
		const { container } = render(ProblemList, { problems, onjump: vi.fn() });
		const names = [...container.querySelectorAll('[data-problem] .font-semibold')].map((n) => n.textContent);
		expect(names).toHaveLength(PROBLEM_CODES.length);
		for (const [i, name] of names.entries()) expect(name, PROBLEM_CODES[i]).not.toBe(PROBLEM_CODES[i]);
		expect(screen.getByRole('button', { name: /Number without a source s/ })).toBeInTheDocument();
	});
});
