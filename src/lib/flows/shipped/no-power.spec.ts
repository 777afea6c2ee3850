/**
 * The no-power flow, version 2 (review issue points 1, 2, 4, 5 and 7), walked on its compiled
 * machine. Every test here failed on version 1 of flows/no-power-after-liquid.flow.yaml.
 */
import { describe, expect, it } from 'vitest';
import { rangeFor } from '../machine';
import { eventsTo, reachable, shippedFlow, stepText, walk, walkVia } from './shipped';

const def = shippedFlow('no-power-after-liquid');

/** A step that connects a charger or the bench supply to the phone or its board. */
function powers(id: string): boolean {
	const step = def.steps[id];
	if (step.kind === 'measure' && /bench power supply|usb power meter/i.test(step.instrument ?? ''))
		return true;
	return /(?<!not\**\s)\bconnect (a |the )?(known-good )?(charger|bench supply)/i.test(stepText(step));
}
const disconnectsBattery = (id: string) =>
	def.steps[id].kind === 'test' && /disconnect the battery/i.test(stepText(def.steps[id]));
const cleansAndDries = (id: string) =>
	/isopropyl alcohol/.test(stepText(def.steps[id])) && /dry fully/.test(stepText(def.steps[id]));

/** The step the board reaches from press-power-current with a reading of `amps`. */
function afterBootReading(amps: number) {
	const at = walkVia(def, 'press-power-current', [{ type: 'MEASURE', value: amps }]);
	expect(at.refusedAt).toBeNull();
	return at.step;
}

describe('no power after liquid, version 2', () => {
	it('connects no charger or supply before a step that disconnects the battery (point 1)', () => {
		const before = reachable(def, def.start, disconnectsBattery);
		const early = [...before].filter((id) => !disconnectsBattery(id) && powers(id));
		expect(early).toEqual([]);
		// And every supply or charger comes after the board was cleaned and dried.
		const unclean = [...reachable(def, def.start, cleansAndDries)].filter((id) => powers(id));
		expect(unclean).toEqual([]);
		expect([...reachable(def, def.start)].some(powers)).toBe(true);
	});

	it('walks a warm phone to the battery verdict without any step that heats the adhesive (point 2)', () => {
		const warm = eventsTo(def, 'power-on-as-received')!;
		const route = walk(def, [
			...warm,
			{ type: 'ANSWER', outcome: 'Stays dark and gets warm' },
			{ type: 'ANSWER', outcome: 0 }
		]);
		expect(route.refusedAt).toBeNull();
		expect(route.verdict).toBe('battery-out-of-service');
		const visited = route.path.map((p) => p.step);
		for (const id of visited) expect(def.steps[id].cautions ?? [], id).not.toContain('hot-air');
		expect(def.steps['battery-out-of-service'].cautions).toContain('electrolyte');
	});

	it('states the supply voltage and current limit on every bench-supply reading (point 4)', () => {
		const readings = Object.entries(def.steps).filter(
			([, s]) => s.kind === 'measure' && s.instrument === 'bench power supply'
		);
		expect(readings.length).toBeGreaterThanOrEqual(2);
		for (const [id, s] of readings) {
			expect(stepText(s), id).toMatch(/nominal voltage/);
			expect(stepText(s), id).toMatch(/current limit(?: to)? 1 a\b/);
			expect(stepText(s), id).not.toMatch(/4\.0 v/);
			expect(s.cautions, id).toContain('bench-supply');
		}
	});

	it('sends a steady, unmoving boot-sized draw away from the normal-boot path (point 4)', () => {
		const step = afterBootReading(0.3);
		expect(step).not.toBe('bench-boot-result');
		const choice = def.steps[step];
		expect(choice.kind).toBe('test');
		if (choice.kind !== 'test') return;
		const steady = choice.outcomes!.find((o) => /steady/i.test(o.label))!;
		const moving = choice.outcomes!.find((o) => /moved like a boot/i.test(o.label))!;
		expect(reachable(def, steady.next).has('bench-boot-result')).toBe(false);
		expect(moving.next).toBe('bench-boot-result');
		const atLimit = choice.outcomes!.find((o) => /current limit/i.test(o.label))!;
		expect(walk(def, [...eventsTo(def, step)!, { type: 'ANSWER', outcome: atLimit.label }]).step).toBe(
			'find-hot-component'
		);
	});

	it('does not read a board that switches itself on as a standby short (point 4)', () => {
		const at = walkVia(def, 'standby-current', [{ type: 'MEASURE', value: 0.15 }]);
		expect(at.step).not.toBe('find-hot-component');
		const selfStart = walk(def, [
			...eventsTo(def, 'standby-current')!,
			{ type: 'MEASURE', value: 0.15 },
			{ type: 'ANSWER', outcome: 'Moves like a boot — the board switched itself on' }
		]);
		expect(selfStart.refusedAt).toBeNull();
		expect(selfStart.step).toBe('bench-boot-result');
		const steady = walk(def, [
			...eventsTo(def, 'standby-current')!,
			{ type: 'MEASURE', value: 0.15 },
			{ type: 'ANSWER', outcome: 'Steady and unmoving' }
		]);
		expect(steady.step).toBe('find-hot-component');
	});

	it('injects into a short at or below the line’s voltage with a current limit, with the freeze-spray caution', () => {
		const inject = def.steps['find-hot-component'];
		expect(stepText(inject)).toMatch(/never above its nominal voltage/);
		expect(inject.cautions).toEqual(expect.arrayContaining(['bench-supply', 'freeze-spray']));
	});

	it('puts a 3.2 V cell in a flat band that leads to charging, not to a connection fault (point 5)', () => {
		const cell = def.steps['battery-voltage'];
		if (cell.kind !== 'measure') throw new Error('battery-voltage is not a measurement');
		const flat = rangeFor(cell, 3.2);
		expect(flat.ok && flat.range.label).toMatch(/flat/i);
		const next = flat.ok ? flat.range.next : '';
		expect(def.steps[next].kind).not.toBe('verdict');
		expect(stepText(def.steps[next])).toMatch(/charger/);
		expect(def.steps[next].cautions).toContain('charging-wet');
		// Charged and booting ends on a verdict that records the data as reachable.
		const charged = walkVia(def, 'battery-voltage', [
			{ type: 'MEASURE', value: 3.2 },
			{ type: 'ANSWER', outcome: 'Takes charge and boots to the lock screen' }
		]);
		expect(charged.verdict).toBe('flat-cell-charged');
		expect(charged.path.at(-1)!.records).toBe('data-reachable');
	});

	it('writes off a cell below 2.0 V and weighs one between 2.0 and 3.0 V by how long it sat flat (point 5)', () => {
		expect(walkVia(def, 'battery-voltage', [{ type: 'MEASURE', value: 1.6 }]).verdict).toBe(
			'battery-replace'
		);
		const deep = walkVia(def, 'battery-voltage', [{ type: 'MEASURE', value: 2.5 }]);
		expect(deep.verdict).toBeUndefined();
		const judge = def.steps[deep.step];
		expect(judge.kind).toBe('test');
		const nexts = judge.kind === 'test' ? judge.outcomes!.map((o) => o.next) : [];
		expect(nexts).toContain('battery-replace');
		expect(nexts.some((n) => def.steps[n].kind !== 'verdict')).toBe(true);
		expect(walkVia(def, 'battery-voltage', [{ type: 'MEASURE', value: 3.9 }]).verdict).toBe('battery-path');
	});

	it('gives a short, a partial leak and an open line each an outcome in diode mode (point 7)', () => {
		const diode = Object.values(def.steps).filter((s) => s.kind === 'test' && /diode mode/.test(stepText(s)));
		expect(diode.length).toBeGreaterThan(0);
		for (const s of diode) {
			if (s.kind !== 'test') continue;
			expect(stepText(s)).toMatch(/known-good board/);
			const labels = s.outcomes!.map((o) => o.label.toLowerCase());
			for (const kind of [/short/, /leak/, /open line|\bol\b/])
				expect(labels.some((l) => kind.test(l))).toBe(true);
			expect(new Set(s.outcomes!.map((o) => o.next)).size).toBe(s.outcomes!.length);
		}
	});

	it('watches a restarting board for at least five minutes before blaming the board', () => {
		const isolate = def.steps['restart-isolate'];
		expect(stepText(isolate)).toMatch(/at least 5 min/);
		expect(
			walkVia(def, 'restart-isolate', [
				{ type: 'ANSWER', outcome: 'Boots to the lock screen and stays up with the modules unplugged' }
			]).verdict
		).toBe('module-fault');
	});
});
