import { fireEvent, render, screen, within } from '@testing-library/svelte';
import userEvent from '@testing-library/user-event';
import { describe, expect, it, vi } from 'vitest';
import type { MeasureStep, Step, SymptomStep, TestStep, VerdictStep } from '$lib/flows/schema';
import { renderStepsHtml } from '$lib/markdown/steps';
import StepView from './StepView.svelte';

/** The step's HTML as the run page's load renders and sanitises it. */
const htmlOf = (step: Step) => renderStepsHtml({ steps: { s: step } } as never).s;

// Steps quoted (shortened) from flows/restart-loop-after-liquid.flow.yaml.
const symptom: SymptomStep = {
	kind: 'symptom',
	title: 'What does the phone do when powered on as received?',
	body: 'Power the phone on and watch it for **about two minutes**.',
	minutes: 3,
	outcomes: [
		{ label: 'Restarts again and again', next: 'open' },
		{ label: 'Sits in the recovery screen', next: 'open' },
		{ label: 'Boots to the lock screen and stays up', next: 'done', records: 'data-reachable' }
	]
};
const test: TestStep = {
	kind: 'test',
	title: 'Open the phone and disconnect the battery',
	body: 'Disconnect the battery first.',
	cautions: ['battery', 'hot-air'],
	minutes: 15,
	outcomes: [
		{ label: 'Battery swollen, hissing or leaking', next: 'a' },
		{ label: 'Battery looks normal and is disconnected', next: 'b' }
	]
};
const measure: MeasureStep = {
	kind: 'measure',
	title: 'Diode-mode reading on the front sensor flex connector, board side',
	instrument: 'multimeter in diode mode',
	minutes: 6,
	unit: 'V',
	domain: { min: 0, max: 3 },
	ranges: [
		{ min: 0, max: 0.05, label: 'Short to ground', next: 'short' },
		{ min: 0.05, label: 'No short', next: 'ok' }
	]
};
const verdict: VerdictStep = {
	kind: 'verdict',
	title: 'Front sensor flex damaged by liquid',
	cautions: ['battery', 'flux-fume'],
	verdict: {
		code: 'front-flex-fault',
		severity: 'replace',
		repair: '- [ ] Disconnect the battery.\n- [ ] Fit the flex and test every function.',
		parts: ['front sensor flex'],
		risks: 'Do not promise that face unlock will work until it has been tested.'
	}
};

describe('StepView: symptom and test steps', () => {
	it('shows the title, sanitised body and one thumb-sized button per outcome with its key', () => {
		const step = { ...symptom, body: symptom.body + '<img src=x onerror="alert(1)">' };
		render(StepView, { stepId: 'power-on', step, html: htmlOf(step) });
		expect(screen.getByRole('heading', { level: 1 })).toHaveTextContent(symptom.title);
		expect(screen.getByText('about two minutes').tagName).toBe('STRONG');
		expect(document.querySelector('[onerror]')).toBeNull();
		const buttons = within(screen.getByRole('list', { name: 'Outcomes' })).getAllByRole('button');
		expect(buttons.map((b) => b.getAttribute('aria-keyshortcuts'))).toEqual(['1', '2', '3']);
		expect(buttons[0]).toHaveTextContent('1 Restarts again and again');
		expect(buttons[2]).toHaveTextContent('records: data reachable');
		expect(screen.getByText('about 3 min')).toBeInTheDocument();
	});

	it('answers with number keys 1–9 and clicks, but not while typing a note', async () => {
		const onanswer = vi.fn();
		render(StepView, { stepId: 'power-on', step: symptom, onanswer });
		await fireEvent.keyDown(window, { key: '2' });
		expect(onanswer).toHaveBeenLastCalledWith(1);
		await fireEvent.keyDown(window, { key: '9' }); // no ninth outcome
		await fireEvent.keyDown(window, { key: '0' });
		expect(onanswer).toHaveBeenCalledTimes(1);
		await userEvent.type(screen.getByLabelText(/Notes on this step/), '3 pads corroded');
		expect(onanswer).toHaveBeenCalledTimes(1);
		await userEvent.click(screen.getByRole('button', { name: /Boots to the lock screen/ }));
		expect(onanswer).toHaveBeenLastCalledWith(2);
	});

	it('puts the cautions, with icon words and the deference line, above the outcome buttons', () => {
		render(StepView, { stepId: 'open', step: test });
		const banners = screen.getAllByRole('note');
		expect(banners.map((b) => b.getAttribute('data-caution'))).toEqual(['battery', 'hot-air']);
		expect(banners[0]).toHaveTextContent('Lithium-ion battery.');
		expect(screen.getByText(/follow local codes and your shop/)).toBeInTheDocument();
		const outcomes = screen.getByRole('list', { name: 'Outcomes' });
		expect(banners[1].compareDocumentPosition(outcomes) & Node.DOCUMENT_POSITION_FOLLOWING).toBeTruthy();
	});

	it('offers Back only when there is an answer to revise', async () => {
		const onback = vi.fn();
		const { rerender } = render(StepView, { stepId: 'open', step: test, onback, canGoBack: false });
		expect(screen.getByRole('button', { name: /Back to the previous step/ })).toBeDisabled();
		await rerender({ stepId: 'open', step: test, onback, canGoBack: true });
		await userEvent.click(screen.getByRole('button', { name: /Back to the previous step/ }));
		expect(onback).toHaveBeenCalledOnce();
		expect(screen.getByText(/keeps the earlier answer in the revision trail/)).toBeInTheDocument();
	});
});

describe('StepView: measure step', () => {
	const lit = () => document.querySelector('[data-lit="true"]')?.textContent ?? null;

	it('lights the range the reading falls in as it is typed, and records it', async () => {
		const onmeasure = vi.fn();
		render(StepView, { stepId: 'diode', step: measure, onmeasure });
		const input = screen.getByLabelText(/Reading/);
		expect(screen.getByText('V', { selector: 'span' })).toBeInTheDocument();
		expect(lit()).toBeNull();
		await userEvent.type(input, '0.01');
		// 0.01 V lies in [0, 0.05): "Short to ground" (the step's first range, min inclusive).
		expect(lit()).toContain('Short to ground');
		await userEvent.clear(input);
		await userEvent.type(input, '0,05'); // comma as decimal mark; 0.05 is the second range's min
		expect(lit()).toContain('No short');
		await userEvent.click(screen.getByRole('button', { name: /Record reading/ }));
		expect(onmeasure).toHaveBeenCalledWith(0.05);
	});

	it('says clearly why a value is refused and will not record it', async () => {
		const onmeasure = vi.fn();
		render(StepView, { stepId: 'diode', step: measure, onmeasure });
		const input = screen.getByLabelText(/Reading/);
		await userEvent.type(input, '5');
		expect(screen.getByText('A reading above 3 V is not possible here.')).toBeInTheDocument();
		expect(input).toHaveAttribute('aria-invalid', 'true');
		expect(screen.getByRole('button', { name: /Record reading/ })).toBeDisabled();
		await userEvent.clear(input);
		await userEvent.type(input, '5 V');
		expect(screen.getByText('Enter the reading as a number.')).toBeInTheDocument();
		await userEvent.type(input, '{Enter}');
		expect(lit()).toBeNull();
		expect(onmeasure).not.toHaveBeenCalled();
	});
});

describe('StepView: verdict', () => {
	it('shows the verdict, its severity in words, the repair checklist, parts, risks and cautions', () => {
		render(StepView, {
			stepId: 'front-flex-fault',
			step: verdict,
			html: htmlOf(verdict),
			dataReachable: true,
			checklistsHref: '/jobs/j1/checklists'
		});
		expect(screen.getByRole('heading', { level: 1 })).toHaveTextContent(
			'Front sensor flex damaged by liquid'
		);
		expect(screen.getByText('Severity: Replace a part')).toBeInTheDocument();
		expect(screen.getByText('front-flex-fault')).toBeInTheDocument();
		const repair = screen.getByRole('region', { name: 'Repair checklist' });
		expect(within(repair).getAllByRole('checkbox')).toHaveLength(2);
		expect(
			within(screen.getByRole('region', { name: 'Parts' })).getByText('front sensor flex')
		).toBeInTheDocument();
		expect(screen.getByRole('region', { name: /Remaining risks/ })).toHaveTextContent('face unlock');
		expect(screen.getAllByRole('note').map((n) => n.getAttribute('data-caution'))).toEqual([
			'battery',
			'flux-fume'
		]);
		expect(screen.getByText(/User data reachable/)).toBeInTheDocument();
		expect(screen.queryByRole('list', { name: 'Outcomes' })).toBeNull();
		expect(screen.getByRole('link', { name: /repair and function-test checklists/ })).toHaveAttribute(
			'href',
			'/jobs/j1/checklists'
		);
	});

	it('without rendered HTML still shows the texts, as plain text', () => {
		render(StepView, { stepId: 'front-flex-fault', step: verdict });
		expect(screen.getByRole('region', { name: /Remaining risks/ })).toHaveTextContent('face unlock');
		expect(screen.queryByRole('checkbox')).toBeNull();
		expect(screen.queryByRole('link', { name: /checklists/ })).toBeNull();
	});
});

describe('StepView: where the numbers come from', () => {
	const provenance = [
		{
			about: '0.05 V line between short and no short',
			basis: 'common-practice' as const,
			source: 'from memory'
		},
		{ about: 'valid readings up to 3 V', basis: 'maker' as const },
		{ about: 'bake at 125 °C', basis: 'published' as const, source: 'IPC/JEDEC J-STD-033' }
	];

	it("lists each entry of a measure step's provenance, open, beside its bands", () => {
		render(StepView, { stepId: 'flex-diode', step: { ...measure, provenance } });
		const region = screen.getByRole('region', { name: 'Where these numbers come from' });
		const items = within(region)
			.getAllByRole('listitem')
			.map((li) => li.textContent?.replace(/\s+/g, ' ').trim());
		expect(items).toEqual([
			'0.05 V line between short and no short — common practice, no published source (from memory)',
			"valid readings up to 3 V — maker's documentation: check your model's",
			'bake at 125 °C — published: IPC/JEDEC J-STD-033'
		]);
		expect(screen.getByRole('list', { name: 'Ranges' })).toBeInTheDocument();
	});

	it('shows it on a verdict too, and nothing when a step has none', () => {
		render(StepView, { stepId: 'v', step: { ...verdict, provenance: provenance.slice(2) } });
		expect(screen.getByRole('region', { name: 'Where these numbers come from' })).toHaveTextContent(
			'J-STD-033'
		);
	});

	it('shows no provenance section for a step without entries', () => {
		render(StepView, { stepId: 'flex-diode', step: measure });
		expect(screen.queryByRole('region', { name: 'Where these numbers come from' })).toBeNull();
	});
});
