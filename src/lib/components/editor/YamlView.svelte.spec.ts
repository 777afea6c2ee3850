import { fireEvent, render, screen } from '@testing-library/svelte';
import userEvent from '@testing-library/user-event';
import { describe, expect, it, vi } from 'vitest';
import { toFlowYaml } from '$lib/flows/to-yaml';
import { tinyFlow } from '$lib/flows/fixture';
import YamlView from './YamlView.svelte';

function setup() {
	const onapply = vi.fn();
	render(YamlView, { definition: tinyFlow(), onapply, delay: 0 });
	return {
		onapply,
		box: screen.getByLabelText('Flow as YAML') as HTMLTextAreaElement,
		user: userEvent.setup()
	};
}

describe('YamlView', () => {
	it('shows the draft as the same YAML the download gives', () => {
		const { box } = setup();
		expect(box.value).toBe(toFlowYaml(tinyFlow()));
		expect(screen.getByText('The YAML is a flow and passes the check.')).toBeInTheDocument();
	});

	it('refuses invalid YAML with a clear message, keeps the text and leaves the draft alone', async () => {
		const { box, onapply, user } = setup();
		const broken = box.value.replace('title: Tiny', 'title: [unclosed');
		await fireEvent.input(box, { target: { value: broken } });
		await user.click(screen.getByRole('button', { name: 'Apply to the draft' }));
		expect(screen.getByRole('alert')).toHaveTextContent(
			/Not applied: the YAML has \d+ problems? .*Your text is kept/
		);
		expect(screen.getAllByText(/^Line \d+:$/).length).toBeGreaterThan(0);
		expect(box.value).toBe(broken);
		expect(onapply).not.toHaveBeenCalled();
	});

	it('refuses a custom tag, which parses to nothing safe', async () => {
		const { box, onapply, user } = setup();
		await fireEvent.input(box, {
			target: { value: box.value.replace('summary: For tests.', 'summary: !!js/function "x"') }
		});
		await user.click(screen.getByRole('button', { name: 'Apply to the draft' }));
		expect(screen.getByRole('alert')).toHaveTextContent('Not applied');
		expect(onapply).not.toHaveBeenCalled();
	});

	it('applies valid YAML, problems of the check and all, as the new draft', async () => {
		const { box, onapply, user } = setup();
		await fireEvent.input(box, { target: { value: box.value.replace('next: short', 'next: nowhere') } });
		await vi.waitFor(() => expect(screen.getByText(/leads to "nowhere"/)).toBeInTheDocument());
		await user.click(screen.getByRole('button', { name: 'Apply to the draft' }));
		expect(onapply).toHaveBeenCalledOnce();
		const def = onapply.mock.calls[0][0];
		expect(def.steps.draw.ranges[1].next).toBe('nowhere');
	});
});
