/**
 * Rules every version-2 flow of this set keeps (issue 11; FLOW-RULES.md rules 1-5, which checkFlow
 * also enforces for every flow once the format's checker carries them). Each test fails on the
 * version-1 files: run with SHIPPED_FLOWS_DIR pointing at a copy of them to see it.
 */
import { describe, expect, it } from 'vitest';
import { flat, loadShipped, reachableAvoiding, verdicts } from './load';

const FLOWS = [
	'restart-loop-after-liquid',
	'face-unlock-after-liquid',
	'no-sound-after-liquid',
	'no-power-after-liquid',
	'not-charging-after-liquid'
] as const;

/** A number with one of the units FLOW-RULES rule 1 lists. */
const NUMBER_WITH_UNIT = /\d(?:[\d.,]*\d)?\s?(?:°C|K|V|mV|A|mA|µA|Ω|W|s|min|h|%|ppm|mm|m)(?![\p{L}\d])/iu;

/** FLOW-RULES rule 3: words in a step's text → the cautions it must carry. */
const HAZARDS: [RegExp, string[]][] = [
	[/hot[ -]air|reflow|preheat/i, ['hot-air', 'battery']],
	[/solder|flux|wick|reball/i, ['flux-fume', 'lead', 'eye']],
	[/isopropyl|alcohol/i, ['solvent']],
	[/\buv\b|solder mask/i, ['uv', 'uv-resin']],
	[/freeze spray/i, ['freeze-spray']],
	[/ultrasonic/i, ['ultrasonic']],
	[/bench (?:power )?supply/i, ['bench-supply']],
	[/\bpry|prying|open the phone/i, ['eye']],
	[/charger|charging/i, ['charging-wet']],
	[/electrolyte/i, ['electrolyte']]
];
const HEAT_OR_SOLDER = /hot[ -]air|reflow|preheat|solder|flux|wick|reball/i;

/** IPC/JEDEC J-STD-033, bake before rework at 125 °C, packages ≤ 1.4 mm thick, saturated (published). */
const JSTD033_125C_THIN: Record<string, number> = { '2a': 5, '3': 9, '4': 11, '5': 12, '5a': 16 };

describe.each(FLOWS)('%s (version 2 rules)', (id) => {
	const def = loadShipped(id);
	const steps = Object.entries(def.steps);

	it('gives every number a technician compares against its provenance (§3)', () => {
		const missing = steps.flatMap(([sid, s]) => {
			const hasNumber =
				NUMBER_WITH_UNIT.test(flat(s)) || (s.kind === 'measure' && (s.ranges?.length ?? 0) > 0);
			return hasNumber && !(s.provenance?.length ?? 0) ? [sid] : [];
		});
		expect(missing).toEqual([]);
		for (const [, s] of steps)
			for (const p of s.provenance ?? []) if (p.basis === 'published') expect(p.source, p.about).toBeTruthy();
	});

	it('names the caution for every hazard a step mentions (§2, point 11)', () => {
		const missing = steps.flatMap(([sid, s]) =>
			HAZARDS.flatMap(([words, cautions]) =>
				words.test(flat(s))
					? cautions.filter((c) => !(s.cautions ?? []).includes(c)).map((c) => `${sid}: ${c}`)
					: []
			)
		);
		expect(missing).toEqual([]);
	});

	it('makes every repair with hot air or solder board-level, with the hot-air, flux-fume, lead, eye and battery cautions (point 11)', () => {
		for (const { id: vid, step } of verdicts(def)) {
			if (!HEAT_OR_SOLDER.test(step.verdict.repair)) continue;
			expect(['board-level', 'uneconomic'], vid).toContain(step.verdict.severity);
			expect(step.cautions, vid).toEqual(
				expect.arrayContaining(['hot-air', 'flux-fume', 'lead', 'eye', 'battery'])
			);
		}
	});

	it('says in every repair, replace or board-level verdict that water resistance is no longer assured, and reassembles with new adhesive and seals (point 13)', () => {
		const opened = verdicts(def).filter((v) =>
			['repair', 'replace', 'board-level'].includes(v.step.verdict.severity)
		);
		expect(opened.length).toBeGreaterThan(0);
		for (const { id: vid, step } of opened) {
			expect(step.verdict.risks.replace(/\s+/g, ' '), vid).toMatch(/water resistance/i);
			expect(step.verdict.repair, vid).toMatch(/adhesive|seal/i);
		}
	});

	it('tells the customer about water resistance in every verdict reached after the phone was opened, whatever its severity, and reassembles it with new adhesive and seals (point 13)', () => {
		const openSteps = steps.filter(([, s]) => /open the phone/i.test(s.title)).map(([sid]) => sid);
		expect(openSteps.length).toBeGreaterThan(0);
		const beforeOpening = reachableAvoiding(def, def.start, openSteps);
		const afterOpening = verdicts(def).filter((v) => !beforeOpening.has(v.id));
		expect(afterOpening.length).toBeGreaterThan(0);
		for (const { id: vid, step } of afterOpening) {
			expect(step.verdict.risks.replace(/\s+/g, ' '), vid).toMatch(/water resistance is no longer assured/i);
			expect(step.verdict.repair, vid).toMatch(/reassemble with new display adhesive and seals/i);
		}
	});

	it('names the cleaning solvent with its strength wherever a step uses it (point 8)', () => {
		for (const [sid, s] of steps)
			if (
				/isopropyl alcohol/i.test(s.body ?? '') ||
				(s.kind === 'verdict' && /isopropyl/i.test(s.verdict.repair))
			)
				expect(flat(s), sid).toMatch(/isopropyl alcohol of 99 % or more/i);
	});

	it('quotes J-STD-033 bake times only as the standard gives them (IPC/JEDEC J-STD-033, 125 °C, ≤ 1.4 mm)', () => {
		const quoted = steps.flatMap(([sid, s]) =>
			[...flat(s).matchAll(/MSL (\d[a-z]?) (\d+) h/g)].map((m) => ({ sid, level: m[1], hours: Number(m[2]) }))
		);
		expect(quoted.filter((q) => JSTD033_125C_THIN[q.level] !== q.hours)).toEqual([]);
	});

	it('marks its rules of thumb as common practice and says what changed in a changelog (point 12)', () => {
		expect(def.summary).toMatch(/common practice/i);
		expect(def.summary).not.toMatch(/usual culprit/i);
		expect(def.changelog ?? '').toMatch(/version 2/i);
	});
});
