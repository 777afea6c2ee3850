/**
 * Points of the v2 review that both power flows (no power, not charging) must meet: cautions that
 * match the words, severities that match the work, water resistance after opening, a source for
 * every number, cleaning and ball-grid rework spelled out, and data-reachable answers recorded.
 * Each of these failed on version 1 of the files (run with SHIPPED_FLOWS_DIR pointing at them).
 */
import { describe, expect, it } from 'vitest';
import { HAZARDS, HEAT_WORK, NUMBER_WITH_UNIT, shippedFlow, stepText } from './shipped';

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

	it('carries the caution for every hazard its words name (FLOW-RULES rule 3)', () => {
		const missing: string[] = [];
		for (const [stepId, step] of steps) {
			const text = stepText(step);
			for (const [words, cautions] of HAZARDS)
				if (words.test(text))
					for (const c of cautions) if (!step.cautions?.includes(c)) missing.push(`${stepId}: ${c}`);
		}
		expect(missing).toEqual([]);
	});

	it('calls a verdict that needs hot air or solder board-level (rule 4)', () => {
		const wrong = steps
			.filter(([, s]) => s.kind === 'verdict' && HEAT_WORK.test(s.verdict.repair.toLowerCase()))
			.filter(([, s]) => s.kind === 'verdict' && !['board-level', 'uneconomic'].includes(s.verdict.severity))
			.map(([stepId]) => stepId);
		expect(wrong).toEqual([]);
	});

	it('says after every opening repair that water resistance is no longer assured, and reassembles with new adhesive (rule 5)', () => {
		const verdicts = steps.filter(
			([, s]) => s.kind === 'verdict' && ['repair', 'replace', 'board-level'].includes(s.verdict.severity)
		);
		expect(verdicts.length).toBeGreaterThan(3);
		for (const [stepId, s] of verdicts) {
			if (s.kind !== 'verdict') continue;
			// The checker reads the words as written, so "water resistance" must not break across lines.
			expect(s.verdict.risks, stepId).toMatch(/water resistance/i);
			const risks = s.verdict.risks.replace(/\s+/g, ' ');
			expect(risks, stepId).toMatch(/water resistance is no longer assured unless new adhesive and seals/i);
			expect(s.verdict.repair.replace(/\s+/g, ' '), stepId).toMatch(
				/reassemble with new (display )?adhesive and seals/i
			);
		}
	});

	it('names the source of every number it states and of every measurement band (rules 1, 2)', () => {
		for (const [stepId, step] of steps) {
			const needs = step.kind === 'measure' || NUMBER_WITH_UNIT.test(stepText(step));
			if (needs) expect(step.provenance?.length ?? 0, stepId).toBeGreaterThan(0);
			for (const p of step.provenance ?? [])
				if (p.basis === 'published') expect(p.source, stepId).toBeTruthy();
		}
	});

	it('marks every measurement band as common practice or the maker’s documentation, and says when it is from memory', () => {
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
