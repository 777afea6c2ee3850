/**
 * The not-charging flow, version 2 (review issue points 1, 2, 5 and 7), walked on its compiled
 * machine. Every test here failed on version 1 of flows/not-charging-after-liquid.flow.yaml.
 */
import { describe, expect, it } from 'vitest';
import { rangeFor } from '../machine';
import { eventsTo, reachable, shippedFlow, stepText, walk, walkVia } from './shipped';

const def = shippedFlow('not-charging-after-liquid');

/** A step that puts a charger on the phone. */
function charges(id: string): boolean {
	const step = def.steps[id];
	if (step.kind === 'measure' && /usb power meter/i.test(step.instrument ?? '')) return true;
	return /(?<!not\**\s)\bconnect (a |the )?(known-good )?charger/i.test(stepText(step));
}
const text = (id: string) => stepText(def.steps[id]);
const disconnectsBattery = (id: string) =>
	def.steps[id].kind === 'test' && /disconnect the battery/.test(text(id));
const cleansAndDries = (id: string) => /isopropyl alcohol/.test(text(id)) && /dry fully/.test(text(id));

describe('not charging after liquid, version 2', () => {
	it('puts no charger on the phone before it is opened, its battery disconnected, cleaned and dried (point 1)', () => {
		const beforeOpening = [...reachable(def, def.start, disconnectsBattery)].filter(charges);
		expect(beforeOpening).toEqual([]);
		const beforeCleaning = [...reachable(def, def.start, cleansAndDries)].filter(charges);
		expect(beforeCleaning).toEqual([]);
		const charging = [...reachable(def, def.start)].filter(charges);
		expect(charging.length).toBeGreaterThan(0);
		for (const id of charging) expect(def.steps[id].cautions, id).toContain('charging-wet');
		for (const id of charging) expect(text(id), id).toMatch(/non-flammable surface|attended/);
	});

	it('walks a warm phone, opened without heat, to the battery verdict (point 2)', () => {
		const route = walk(def, [
			...eventsTo(def, 'boot-state')!,
			{ type: 'ANSWER', outcome: 'Warm, or the display or back is lifting' },
			{ type: 'ANSWER', outcome: 'Battery swollen, hissing, leaking or still heating' }
		]);
		expect(route.refusedAt).toBeNull();
		expect(route.verdict).toBe('battery-out-of-service');
		for (const p of route.path) expect(def.steps[p.step].cautions ?? [], p.step).not.toContain('hot-air');
	});

	it('treats a 3.2 V cell as a flat cell to be charged, a symptom and not a verdict (point 5)', () => {
		const cell = def.steps['battery-voltage'];
		if (cell.kind !== 'measure') throw new Error('battery-voltage is not a measurement');
		const flat = rangeFor(cell, 3.2);
		expect(flat.ok && flat.range.label).toMatch(/flat/i);
		const at = walkVia(def, 'battery-voltage', [{ type: 'MEASURE', value: 3.2 }]);
		expect(at.verdict).toBeUndefined();
		expect(text(at.step)).toMatch(/charg/);
		expect(def.steps[at.step].cautions).toContain('charging-wet');
	});

	it('writes off a cell below 2.0 V and lets one between 2.0 and 3.0 V that was drained recently pre-charge (point 5)', () => {
		expect(walkVia(def, 'battery-voltage', [{ type: 'MEASURE', value: 1.8 }]).verdict).toBe(
			'battery-replace'
		);
		const recent = walkVia(def, 'battery-voltage', [
			{ type: 'MEASURE', value: 2.6 },
			{ type: 'ANSWER', outcome: 'Drained within the last few days and looks normal' }
		]);
		expect(recent.refusedAt).toBeNull();
		expect(recent.step).toBe('usb-voltage');
		const long = walkVia(def, 'battery-voltage', [
			{ type: 'MEASURE', value: 2.6 },
			{ type: 'ANSWER', outcome: 'Sat flat for weeks or longer, not known, or any swelling' }
		]);
		expect(long.verdict).toBe('battery-replace');
	});

	it('tries a known-good battery before blaming the cell or the board when current flows but nothing fills', () => {
		const route = walkVia(def, 'charge-over-time', [
			{ type: 'ANSWER', outcome: 'Draws current but the percentage or cell voltage does not rise' }
		]);
		expect(route.step).toBe('known-good-battery');
		expect(walk(def, [...eventsTo(def, 'known-good-battery')!, { type: 'ANSWER', outcome: 0 }]).verdict).toBe(
			'battery-replace'
		);
	});

	it('gives a short, a partial leak and an open line at the charging input each an outcome (point 7)', () => {
		const diode = def.steps['charging-input-diode'];
		expect(diode?.kind).toBe('test');
		if (diode?.kind !== 'test') return;
		expect(text('charging-input-diode')).toMatch(/known-good board/);
		expect(text('charging-input-diode')).toMatch(/pins beside them|other pins/);
		const next = (re: RegExp) => diode.outcomes!.find((o) => re.test(o.label))?.next;
		expect(next(/short/)).toBe('charging-input-short');
		expect(next(/leak/)).toBe('charging-input-short');
		expect(next(/open line/)).toBe('open-line');
		expect(next(/like the known-good/)).toBe('charging-circuit');
		expect(text('charging-input-short')).toMatch(/for a leak/);
	});

	it('ends a phone that charges but does not start on a verdict that says so, not on "charges normally"', () => {
		const route = walkVia(def, 'charge-over-time', [
			{ type: 'ANSWER', outcome: 'Charges, but the phone still does not start' }
		]);
		expect(route.verdict).toBe('charges-but-no-boot');
		expect(text('charges-but-no-boot')).toMatch(/no power or no boot after liquid/);
	});
});
