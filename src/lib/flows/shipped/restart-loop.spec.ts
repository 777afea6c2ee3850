/**
 * Issue 11 fixes in flows/restart-loop-after-liquid.flow.yaml (version 2). Each test fails on
 * version 1: run with SHIPPED_FLOWS_DIR pointing at a copy of it.
 */
import { describe, expect, it } from 'vitest';
import { flat, loadShipped, walk } from './load';

const def = loadShipped('restart-loop-after-liquid');
const step = (id: string) => {
	expect(def.steps, `step ${id}`).toHaveProperty(id);
	return def.steps[id];
};
/** Battery fine, corrosion seen, phone boots with the front flex unplugged: at the diode reading. */
const toDiode = [
	'Restarts again and again',
	'Battery looks normal and is disconnected',
	'Corrosion or residue seen and photographed',
	'Boots to the lock screen and stays up'
];

describe('restart-loop flow, version 2', () => {
	it('watches every start for at least five minutes, with its provenance (point 6)', () => {
		const first = step('power-on-as-received');
		expect(flat(first)).toMatch(/at least 5 minutes/);
		expect(first.provenance).toEqual(
			expect.arrayContaining([
				expect.objectContaining({ about: expect.stringMatching(/5 min/), basis: 'common-practice' })
			])
		);
		const watching = Object.entries(def.steps).filter(
			([, s]) => s.kind !== 'verdict' && /\bwatch/i.test(s.body ?? '')
		);
		expect(watching.map(([id]) => id)).toEqual(
			expect.arrayContaining(['isolate-front-flex', 'isolate-other-modules'])
		);
		for (const [id, s] of watching) {
			expect(flat(s), id).toMatch(/at least 5 minutes/);
			expect(flat(s), id).not.toMatch(/two minutes/);
			expect(s.provenance?.length, id).toBeGreaterThan(0);
		}
	});

	it('warns wherever the recovery screen can show that restoring or updating from it erases the phone (point 3)', () => {
		const seen = Object.entries(def.steps).filter(
			([, s]) =>
				(s.kind === 'symptom' || s.kind === 'test') &&
				(s.outcomes ?? []).some((o) => /recovery screen/i.test(o.label))
		);
		expect(seen.map(([id]) => id)).toEqual(['power-on-as-received', 'isolate-front-flex']);
		for (const [id, s] of [...seen, ['isolate-other-modules', step('isolate-other-modules')] as const])
			expect(flat(s), id).toMatch(/restoring or updating from the recovery screen erases the phone/i);
	});

	it('records the data as reachable on every answer that shows the phone booting (point 3)', () => {
		const booting = Object.entries(def.steps).flatMap(([id, s]) =>
			s.kind === 'symptom' || s.kind === 'test'
				? (s.outcomes ?? []).filter((o) => /^Boots/.test(o.label)).map((o) => ({ id, o }))
				: []
		);
		expect(booting.length).toBeGreaterThanOrEqual(6);
		for (const { id, o } of booting) expect(o.records, `${id}: ${o.label}`).toBe('data-reachable');
	});

	it('promises no more in its summary than the flow does (points 3, 12)', () => {
		expect(def.summary).not.toMatch(/usual culprit|has shown where the fault is/i);
		expect(def.summary).toMatch(/common practice/i);
		expect(def.summary).toMatch(/erases the phone/i);
	});

	it('does not power on a phone that is still wet (point 1 applied here)', () => {
		expect(walk(def, ['Still wet, not powered on'])).toBe('open-and-disconnect');
	});

	it('tells a short, partial leakage and an open line apart in diode mode, each with its own verdict (point 7)', () => {
		expect(walk(def, [...toDiode, 0.02])).toBe('front-line-short');
		// A reading above the short band is compared pin by pin, not passed as "no short".
		expect(walk(def, [...toDiode, 0.4])).toBe('front-connector-compare');
		expect(walk(def, [...toDiode, 3])).toBe('front-connector-compare');
		const compare = [...toDiode, 0.4];
		const leak = walk(def, [
			...compare,
			'A pin reads clearly lower than its reference (leakage)',
			'Still reads lower than its reference'
		]);
		const open = walk(def, [...compare, 'A pin shows OL where its reference reads (open line)']);
		expect([leak, open]).toEqual(['front-line-leakage', 'front-line-open']);
		const codes = ['front-line-short', leak, open].map((id) => {
			const s = step(id);
			return s.kind === 'verdict' ? s.verdict.code : '';
		});
		expect(new Set(codes).size).toBe(3);
		expect(flat(step('front-connector-compare'))).toMatch(/known-good board/);
		expect(flat(step('front-connector-compare'))).toMatch(/other pins/);
	});

	it('cleans with isopropyl alcohol of 99 % or more, shields off, and keeps the cell, microphones and open-port sensors out of an ultrasonic bath (point 8)', () => {
		const clean = step('clean-and-dry');
		const text = flat(clean);
		expect(text).toMatch(/isopropyl alcohol of 99 % or more/);
		expect(text).toMatch(/ultrasonic/i);
		expect(text).toMatch(/shield/i);
		for (const never of [/cell/, /microphones/, /sensors with open ports/]) expect(text).toMatch(never);
		expect(clean.cautions).toEqual(expect.arrayContaining(['ultrasonic', 'solvent', 'battery']));
	});

	it('dries the board before ball-grid work with J-STD-033 times, preheats, removes underfill and shields neighbours (point 8)', () => {
		const board = step('board-fault');
		const text = flat(board);
		expect(text).toMatch(/J-STD-033/);
		// IPC/JEDEC J-STD-033: 125 °C, parts ≤ 1.4 mm, saturated — 2a 5 h, 3 9 h, 4 11 h, 5 12 h, 5a 16 h.
		expect(text).toMatch(/125 °C.*1\.4 mm.*MSL 2a 5 h, MSL 3 9 h, MSL 4 11 h, MSL 5 12 h, MSL 5a 16 h/);
		for (const word of [/preheat/i, /underfill/i, /shield the neighbouring parts/i])
			expect(text).toMatch(word);
		expect(board.provenance).toEqual(
			expect.arrayContaining([
				expect.objectContaining({ basis: 'published', source: expect.stringMatching(/J-STD-033/) })
			])
		);
	});

	it('keeps a flex that fits as it comes a module swap and makes moving paired parts board-level (point 11)', () => {
		const known = [
			...toDiode,
			0.4,
			'Every pin reads like its reference',
			'Boots and stays up with the known-good flex'
		];
		const swap = step(walk(def, [...known, 'Not paired; the new flex works as it comes']));
		const move = step(walk(def, [...known, 'Paired; the parts must move to the new flex']));
		expect(swap.kind === 'verdict' && swap.verdict.severity).toBe('replace');
		expect(flat(swap)).not.toMatch(/hot air|solder/i);
		expect(move.kind === 'verdict' && move.verdict.severity).toBe('board-level');
		expect(move.cautions).toEqual(expect.arrayContaining(['hot-air', 'flux-fume', 'lead', 'eye', 'battery']));
	});
});
