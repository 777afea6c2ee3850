import { render, screen, within } from '@testing-library/svelte';
import userEvent from '@testing-library/user-event';
import { describe, expect, it } from 'vitest';
import { FlowEditorState } from './editor.svelte';
import { tinyFlow } from '$lib/flows/fixture';
import StepForm from './StepForm.svelte';

function setup(stepId: string) {
	const editor = new FlowEditorState(tinyFlow(), { delay: 0 });
	editor.selected = stepId;
	const view = render(StepForm, { editor, stepId });
	return { editor, view, user: userEvent.setup() };
}

describe('StepForm', () => {
	it('renames a step and every answer and range that led to it follows', async () => {
		const { editor, user } = setup('fine');
		const id = screen.getByLabelText('Step id');
		await user.clear(id);
		await user.type(id, 'no-fault{Enter}');
		const def = editor.definition;
		expect(Object.keys(def.steps)).toEqual(['look', 'draw', 'no-fault', 'short']);
		expect(def.steps.look.kind === 'symptom' && def.steps.look.outcomes?.[0].next).toBe('no-fault');
		expect(def.steps.draw.kind === 'measure' && def.steps.draw.ranges?.[0].next).toBe('no-fault');
		expect(editor.selected).toBe('no-fault');
		editor.checkNow();
		expect(editor.check.problems).toEqual([]);
	});

	it('refuses a rename that clashes, says why and keeps the old id', async () => {
		const { editor, user } = setup('fine');
		const id = screen.getByLabelText('Step id');
		await user.clear(id);
		await user.type(id, 'short');
		await user.click(screen.getByRole('button', { name: 'Rename' }));
		expect(screen.getByRole('status')).toHaveTextContent('There is already a step "short"');
		expect(Object.keys(editor.definition.steps)).toContain('fine');
		expect(id).toHaveValue('fine');
	});

	it('shows the references before deleting a step others lead to, then deletes on request', async () => {
		const { editor, user } = setup('fine');
		await user.click(screen.getByRole('button', { name: 'Delete' }));
		const alert = screen.getByRole('alert');
		expect(within(alert).getByText('answer "Dry" of step "look"')).toBeInTheDocument();
		expect(within(alert).getByText('range 1 ("Low") of step "draw"')).toBeInTheDocument();
		expect(Object.keys(editor.definition.steps)).toContain('fine');

		await user.click(within(alert).getByRole('button', { name: 'Delete anyway' }));
		expect(Object.keys(editor.definition.steps)).not.toContain('fine');
		editor.checkNow();
		expect(editor.check.problems.map((p) => p.code)).toEqual(['unknown-target', 'unknown-target']);
	});

	it('a reference in the delete warning jumps to the step that holds it', async () => {
		const { editor, user } = setup('fine');
		await user.click(screen.getByRole('button', { name: 'Delete' }));
		await user.click(screen.getByRole('button', { name: 'answer "Dry" of step "look"' }));
		expect(editor.selected).toBe('look');
	});

	it('edits the title, a caution and the next step, and shows the problem beside the answer', async () => {
		const { editor, user, view } = setup('look');
		const title = screen.getByLabelText('Title');
		await user.clear(title);
		await user.type(title, 'Look closely');
		expect(editor.definition.steps.look.title).toBe('Look closely');
		await user.click(screen.getByLabelText('Static discharge'));
		expect(editor.definition.steps.look.cautions).toEqual(['esd']);
		await user.selectOptions(screen.getByLabelText('Answer 1: next step'), '');
		editor.checkNow();
		await view.rerender({ editor, stepId: 'look' });
		const row = view.container.querySelector('[data-exit="0"]') as HTMLElement;
		expect(within(row).getByText(/leads to "", but the flow has no step/)).toBeInTheDocument();
	});

	it('renders the body preview through the sanitiser', async () => {
		const { user, view } = setup('look');
		const body = screen.getByLabelText('Instructions (markdown)');
		await user.click(body);
		await user.paste('**Hold** power <img src=x onerror="window.__pwned=1">');
		const preview = view.container.querySelector('[data-preview]') as HTMLElement;
		expect(preview.querySelector('strong')).toHaveTextContent('Hold');
		expect(preview.querySelector('img')?.getAttribute('onerror')).toBeFalsy();
	});

	it('adds, edits and removes provenance entries, and the live check names what is missing', async () => {
		const { editor, user, view } = setup('draw');
		const problemCodes = () => {
			editor.checkNow();
			return editor.check.problems.map((p) => [p.code, p.step]);
		};
		expect(problemCodes()).toEqual([]);
		// The shared tiny flow's measure carries one entry; removing it leaves the bands unsourced.
		await user.click(screen.getByRole('button', { name: 'Remove entry 1' }));
		expect(editor.definition.steps.draw.provenance).toBeUndefined();
		expect(problemCodes()).toEqual([['provenance-missing', 'draw']]);
		await view.rerender({ editor, stepId: 'draw' });
		expect(
			within(screen.getByRole('list', { name: 'Problems in this step' })).getByText(/Add provenance:/)
		).toBeInTheDocument();

		await user.click(screen.getByRole('button', { name: 'Add a provenance entry' }));
		const entry = screen.getByRole('group', { name: 'Provenance entry 1' });
		await user.type(within(entry).getByLabelText('What it covers'), 'the 0.5 A line');
		await user.selectOptions(within(entry).getByLabelText('Basis'), 'published');
		expect(editor.definition.steps.draw.provenance).toEqual([
			{ about: 'the 0.5 A line', basis: 'published' }
		]);
		expect(problemCodes()).toEqual([['provenance-unsourced', 'draw']]);

		await user.type(within(entry).getByLabelText('Source'), 'IPC-9999 (invented for the test)');
		expect(editor.definition.steps.draw.provenance?.[0].source).toBe('IPC-9999 (invented for the test)');
		expect(problemCodes()).toEqual([]);
	});
});
