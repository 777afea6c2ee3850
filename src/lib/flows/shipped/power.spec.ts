/**
 * Points of the v2 review that both power flows (no power, not charging) must meet beyond the
 * shared rules of rules.spec.ts: the first question, the warm branch, rules of thumb marked,
 * cleaning and ball-grid rework spelled out, and data-reachable answers recorded.
 * Each of these failed on version 1 of the files (run with SHIPPED_FLOWS_DIR pointing at them).
 */
import { describe, expect, it } from 'vitest';
import { shippedFlow, stepText } from './shipped';

// IPC/JEDEC J-STD-033, bake before rework at 125 °C of a saturated part up to 1.4 mm thick, hours
// by moisture sensitivity level (published; docs/trade-reference.md §6).
const JSTD033_125C_HOURS: Record<string, number> = { '2a': 5, '3': 9, '4': 11, '5': 12, '5a': 16 };

describe.each(['no-power-after-liquid', 'not-charging-after-liquid'])('%s, version 2', (id) => {
	const def = shippedFlow(id);
	const steps = Object.entries(def.steps);

	it('says in its changelog what changed from version 1 and why', () => {
		expect(def.changelog ?? '').toMatch(/version 2/i);
		expect(def.changelog ?? '').toMatch(/battery/i);
	});

	it('marks the bands of every measurement as common practice, in its words and in its provenance (point 12)', () => {
		for (const [stepId, step] of steps) {
			if (step.kind !== 'measure') continue;
			const rules = (step.provenance ?? []).filter((p) => p.basis === 'common-practice');
			expect(rules.length, stepId).toBeGreaterThan(0);
			expect(stepText(step), stepId).toMatch(/common practice/);
		}
	});

	it('cleans with isopropyl alcohol of 99 % or more wherever it names the alcohol', () => {
		const alcohol = steps.filter(([, s]) => /isopropyl/.test(stepText(s)));
		expect(alcohol.length).toBeGreaterThan(0);
		for (const [stepId, s] of alcohol) expect(stepText(s), stepId).toMatch(/isopropyl alcohol of 99 %/);
	});

	it('offers ultrasonic cleaning with shields off and says what must never go in', () => {
		const bath = steps.filter(([, s]) => /ultrasonic/.test(stepText(s)));
		expect(bath.length).toBeGreaterThan(0);
		for (const [stepId, s] of bath) {
			const text = stepText(s);
			expect(text, stepId).toMatch(/shields off/);
			expect(text, stepId).toMatch(/never[^.]*cell/);
			expect(text, stepId).toMatch(/microphones/);
			expect(text, stepId).toMatch(/sensors with open ports/);
		}
	});

	it('dries or bakes before ball-grid rework with the J-STD-033 values, preheats, removes underfill and shields the neighbours', () => {
		const ballGrid = steps.filter(([, s]) => /ball-grid/.test(stepText(s)) && /reball/.test(stepText(s)));
		expect(ballGrid.length).toBeGreaterThan(0);
		for (const [stepId, s] of ballGrid) {
			const text = stepText(s);
			expect(text, stepId).toMatch(/dry the (wet )?board first/);
			expect(text, stepId).toMatch(/j-std-033/);
			expect(text, stepId).toMatch(/125 °c/);
			expect(text, stepId).toMatch(/preheat/);
			expect(text, stepId).toMatch(/underfill/);
			expect(text, stepId).toMatch(/shield the neighbours/);
			const quoted = [...text.matchAll(/msl (2a|3|4|5a|5) (\d+) h/g)];
			expect(quoted.length, stepId).toBeGreaterThan(0);
			for (const [, level, hours] of quoted)
				expect(Number(hours), `${stepId} MSL ${level}`).toBe(JSTD033_125C_HOURS[level]);
		}
	});

	it('records that the data is reachable on every answer that shows the lock screen', () => {
		let shown = 0;
		for (const [stepId, step] of steps) {
			if (step.kind !== 'symptom' && step.kind !== 'test') continue;
			for (const o of step.outcomes ?? [])
				if (/lock screen/i.test(o.label) && !/\b(never|not|still)\b/i.test(o.label)) {
					shown++;
					expect(o.records, `${stepId}: ${o.label}`).toBe('data-reachable');
				}
		}
		expect(shown).toBeGreaterThan(1);
	});

	it('asks first when the liquid contact happened and whether the phone was charged since', () => {
		const first = def.steps[def.start];
		expect(first.title).toMatch(/when did the liquid contact happen/i);
		expect(first.title).toMatch(/charged since/i);
		expect(first.cautions).toContain('contaminated');
	});

	it('gives a warm phone its own branch: no heat on the adhesive, battery disconnected at once, on a non-flammable surface', () => {
		const warm = Object.values(def.steps)
			.filter((s) => s.kind === 'symptom')
			.flatMap((s) => s.outcomes ?? [])
			.filter((o) => /warm/i.test(o.label));
		expect(warm.length).toBeGreaterThan(0);
		for (const o of warm) {
			const next = def.steps[o.next];
			const text = stepText(next);
			expect(next.cautions, o.next).toEqual(expect.arrayContaining(['battery', 'electrolyte']));
			expect(next.cautions, o.next).not.toContain('hot-air');
			expect(text).not.toMatch(/with gentle heat|hot air/);
			expect(text).toMatch(/without heat/);
			expect(text).toMatch(/least heat possible/);
			expect(text).toMatch(/disconnect the battery at once/);
			expect(text).toMatch(/non-flammable surface/);
		}
	});
});
