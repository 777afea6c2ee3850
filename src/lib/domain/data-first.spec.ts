import { describe, expect, it } from 'vitest';
import { checkFlow } from '$lib/flows/check';
import { dataFirstFlow } from '$lib/flows/data-first-fixture';
import type { Step } from '$lib/flows/schema';
import {
	dataFate,
	dataGateMessage,
	dataGateStep,
	dataSecureDue,
	needsDataSecured,
	type DataFirstJob
} from './data-first';

const flow = dataFirstFlow();
const open: DataFirstJob = { dataFirst: true, dataOutcome: null };

describe('needsDataSecured', () => {
	const verdict = (severity: 'repair' | 'replace' | 'board-level' | 'uneconomic' | 'no-fault'): Step => ({
		kind: 'verdict',
		title: 'V',
		verdict: { code: 'v', severity, repair: '- [ ] x', risks: 'y' }
	});

	it('holds a step with the hot-air caution, of any kind', () => {
		expect(needsDataSecured(flow.steps['lift-part'])).toBe(true);
		expect(
			needsDataSecured({ kind: 'measure', title: 'M', minutes: 1, unit: 'A', cautions: ['hot-air'] })
		).toBe(true);
	});

	it('holds a board-level verdict and no other severity', () => {
		expect(needsDataSecured(verdict('board-level'))).toBe(true);
		for (const s of ['repair', 'replace', 'uneconomic', 'no-fault'] as const)
			expect(needsDataSecured(verdict(s)), s).toBe(false);
	});

	it('lets other cautions and plain steps through', () => {
		expect(needsDataSecured(flow.steps.inspect)).toBe(false);
		expect(
			needsDataSecured({ kind: 'test', title: 'Clean', minutes: 1, cautions: ['solvent', 'battery'] })
		).toBe(false);
		expect(needsDataSecured(undefined)).toBe(false);
	});
});

describe('dataGateStep', () => {
	it('is a flow the checker accepts', () => {
		expect(checkFlow(flow).problems).toEqual([]);
	});

	it('holds a move into a hot-air step or a board-level verdict once the data is reachable', () => {
		const into = dataGateStep(flow, { from: 'inspect', to: 'lift-part', back: false, reachable: true }, open);
		expect(into).toEqual({ id: 'lift-part', title: 'Lift the corroded part with hot air' });
		expect(dataGateStep(flow, { from: 'inspect', to: 'short', back: false, reachable: true }, open)?.id).toBe(
			'short'
		);
	});

	it('holds an answer at a step that needs the data secured', () => {
		const at = dataGateStep(flow, { from: 'lift-part', to: 'replaced', back: false, reachable: true }, open);
		expect(at?.id).toBe('lift-part');
	});

	it('lets safe moves, BACK, unreachable or unknown data, secured data and other jobs through', () => {
		const risky = { from: 'inspect', to: 'lift-part', back: false, reachable: true as boolean | null };
		expect(dataGateStep(flow, { ...risky, to: 'fine' }, open)).toBeNull();
		expect(dataGateStep(flow, { ...risky, back: true }, open)).toBeNull();
		expect(dataGateStep(flow, { ...risky, reachable: false }, open)).toBeNull();
		expect(dataGateStep(flow, { ...risky, reachable: null }, open)).toBeNull();
		for (const dataOutcome of ['backed-up', 'declined', 'not-possible'] as const)
			expect(dataGateStep(flow, risky, { dataFirst: true, dataOutcome })).toBeNull();
		expect(dataGateStep(flow, risky, { dataFirst: false, dataOutcome: null })).toBeNull();
	});

	it('names the waiting step in its message', () => {
		expect(dataGateMessage('Lift the part')).toMatch(/Secure the customer’s data first.*“Lift the part”/);
	});
});

describe('dataSecureDue and dataFate', () => {
	it('asks only on a data-first job with reachable data and no outcome', () => {
		expect(dataSecureDue(open, true)).toBe(true);
		expect(dataSecureDue(open, null)).toBe(false);
		expect(dataSecureDue({ dataFirst: true, dataOutcome: 'declined' }, true)).toBe(false);
		expect(dataSecureDue({ dataFirst: false, dataOutcome: null }, true)).toBe(false);
	});

	it('states the recorded outcome first, then only what the runs proved', () => {
		expect(dataFate({ dataFirst: true, dataOutcome: 'backed-up' }, true)).toBe('backed-up');
		expect(dataFate({ dataFirst: false, dataOutcome: 'not-possible' }, null)).toBe('not-possible');
		expect(dataFate(open, true)).toBe('reachable');
		expect(dataFate(open, false)).toBe('not-reached');
		expect(dataFate(open, null)).toBe('not-reached');
		expect(dataFate({ dataFirst: false, dataOutcome: null }, false)).toBe('not-reached');
		expect(dataFate({ dataFirst: false, dataOutcome: null }, null)).toBeNull();
	});
});
