/**
 * The flows added with the symptom catalogue, after their walk on the run screen: what that review
 * changed, checked on the compiled machine and the graph. Each test failed on the files as they
 * were before the review (SHIPPED_FLOWS_DIR, see flows/README.md "Changing a shipped flow").
 */
import { describe, expect, it } from 'vitest';
import { flat, loadShipped, reachableAvoiding, verdicts, walk } from './load';

/** Answers that prove the phone runs (it shows a screen, its settings or its camera app). */
const running: Record<string, { step: string; labels: string[] }> = {
	'touch-fault-after-liquid': {
		step: 'what-touch-does',
		labels: [
			'Touches by themselves (taps, swipes, typing)',
			'No touch at all',
			'Dead areas or lines where touch does not respond'
		]
	},
	'no-service-after-liquid': {
		step: 'sim-or-service',
		labels: ['No SIM detected', 'SIM detected, but no service or only a weak signal']
	},
	'wireless-fault-after-liquid': {
		step: 'what-wireless-does',
		labels: ['The switch is greyed out or turns itself off', 'It turns on but finds little, is weak or drops']
	},
	'rear-camera-after-liquid': {
		step: 'what-camera-does',
		labels: [
			'Black picture, or the app will not open or closes',
			'Fog, haze or droplets inside a lens',
			'Will not focus, or the picture shakes or buzzes'
		]
	},
	'buttons-after-liquid': {
		step: 'what-buttons-do',
		labels: [
			'A button presses itself',
			'A button is stiff, sticky or does not click',
			'A button clicks but the phone does not react'
		]
	},
	'fingerprint-after-liquid': {
		step: 'what-sensor-does',
		labels: [
			'The sensor is listed but does not recognise the finger',
			'Enrolment fails or the sensor is missing from the settings'
		]
	},
	'battery-drain-after-liquid': {
		step: 'usage-screen',
		labels: ['An app or a setting explains the drain', 'Nothing there explains it']
	},
	'no-picture-after-liquid': { step: 'torch-check', labels: ['A faint picture is visible'] }
};

describe('the new flows after their run-screen walk', () => {
	it.each(Object.entries(running))(
		'%s: answers that prove the phone runs record that the data is reachable',
		(id, { step, labels }) => {
			const s = loadShipped(id).steps[step];
			expect(s.kind === 'symptom' || s.kind === 'test').toBe(true);
			const outcomes = s.kind === 'symptom' || s.kind === 'test' ? (s.outcomes ?? []) : [];
			for (const label of labels)
				expect(outcomes.find((o) => o.label === label)?.records, `${step}: ${label}`).toBe('data-reachable');
		}
	);

	it('data only: a phone that may still be wet is opened and cleaned before it is switched on', () => {
		const def = loadShipped('data-only-after-liquid');
		const at = walk(def, [
			'Knows the passcode and agrees to opening',
			'Off and possibly still wet — not switched on'
		]);
		expect(at).toBe('open-and-disconnect');
		expect(flat(def.steps['state-now'])).toMatch(/not switched on before it has been opened/);
	});

	it('no picture: feeding a shorted display line from a bench supply carries its caution', () => {
		const step = loadShipped('no-picture-after-liquid').steps['display-line-short'];
		expect(flat(step)).toMatch(/bench supply/);
		expect(step.cautions).toContain('bench-supply');
	});

	it('rear camera: a fogged module reached without opening the phone is opened with the battery disconnected first', () => {
		const def = loadShipped('rear-camera-after-liquid');
		const unopened = reachableAvoiding(def, def.start, ['open-and-clean-connectors']);
		expect(unopened.has('camera-module-replace')).toBe(true);
		const verdict = def.steps['camera-module-replace'];
		expect(flat(verdict)).toMatch(/disconnect the battery before any other connector/);
		expect(verdict.cautions).toEqual(expect.arrayContaining(['battery', 'eye', 'sharp']));
	});

	it('buttons: the first step says flight mode alone may not stop an emergency call', () => {
		const step = loadShipped('buttons-after-liquid').steps['what-buttons-do'];
		expect(flat(step)).toMatch(/flight mode alone may not stop an emergency call/);
		expect(flat(step)).toMatch(/turn off the automatic emergency call/);
	});
});

/** Issue 14's flows, walked on the run screen (all but first aid) and the three optional ones. */
const ISSUE14 = [
	'data-only-after-liquid',
	'no-picture-after-liquid',
	'touch-fault-after-liquid',
	'no-service-after-liquid',
	'wireless-fault-after-liquid',
	'rear-camera-after-liquid',
	'battery-drain-after-liquid',
	'buttons-after-liquid',
	'fingerprint-after-liquid',
	'flash-torch-after-liquid',
	'vibration-after-liquid',
	'corroded-connectors-after-liquid'
] as const;

// The content rules of rules.spec.ts that apply to a first version (its changelog and wording
// checks are specific to the version-2 flows of issue 11).
describe.each(ISSUE14)('%s (content rules)', (id) => {
	const def = loadShipped(id);
	const steps = Object.entries(def.steps);

	it('names the cleaning solvent with its strength wherever a step uses it', () => {
		for (const [sid, s] of steps)
			if (
				/isopropyl alcohol/i.test(s.body ?? '') ||
				(s.kind === 'verdict' && /isopropyl/i.test(s.verdict.repair))
			)
				expect(flat(s), sid).toMatch(/isopropyl alcohol of 99 % or more/i);
	});

	it('marks its rules of thumb as common practice in the summary', () => {
		expect(def.summary).toMatch(/common practice/i);
	});

	it('tells the customer about water resistance in every verdict reached after opening, and closes with new adhesive and seals', () => {
		const openSteps = steps
			.filter(([, s]) => /^open\b/i.test(s.title) || /open the phone|open it\b/i.test(flat(s)))
			.map(([sid]) => sid);
		const beforeOpening = openSteps.length ? reachableAvoiding(def, def.start, openSteps) : new Set<string>();
		const afterOpening = verdicts(def).filter((v) => !beforeOpening.has(v.id));
		expect(afterOpening.length).toBeGreaterThan(0);
		for (const { id: vid, step } of afterOpening) {
			expect(step.verdict.risks.replace(/\s+/g, ' '), vid).toMatch(/water resistance is no longer assured/i);
			expect(step.verdict.repair.replace(/\s+/g, ' '), vid).toMatch(/new adhesive and seals/i);
		}
	});
});
