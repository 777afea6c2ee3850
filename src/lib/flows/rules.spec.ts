/** The trade rules of flow version 2 (FLOW-RULES.md), one step at a time. */
import { describe, expect, it } from 'vitest';
import { checkFlow } from './check';
import { NUMBER_WITH_UNIT } from './rules';
import type { FlowDefinition } from './schema';

const fine = {
	kind: 'verdict',
	title: 'Fine',
	verdict: { code: 'fine', severity: 'no-fault', repair: '-', risks: '-' }
};

/** Problems of the one step `a` (a test leading to a no-fault verdict unless it is a verdict itself). */
function problemsOf(step: Record<string, unknown>) {
	const a = { kind: 'test', title: 'Look', minutes: 1, outcomes: [{ label: 'Done', next: 'fine' }], ...step };
	const def = { id: 'r', title: 'R', summary: '', symptoms: [], start: 'a', steps: { a, fine } };
	if (a.kind === 'measure') delete (a as Record<string, unknown>).outcomes;
	if (a.kind === 'verdict') {
		delete (a as Record<string, unknown>).outcomes;
		delete (a as Record<string, unknown>).minutes;
		def.start = 's';
		Object.assign(def.steps, {
			s: {
				kind: 'test',
				title: 'S',
				minutes: 1,
				outcomes: [
					{ label: 'A', next: 'a' },
					{ label: 'B', next: 'fine' }
				]
			}
		});
	}
	return checkFlow(def as FlowDefinition).problems;
}
const codes = (step: Record<string, unknown>) => problemsOf(step).map((p) => p.code);

const seals = 'Water resistance is no longer assured unless new adhesive and seals are fitted.';
const verdictStep = (severity: string, repair: string, risks = seals, cautions?: string[]) => ({
	kind: 'verdict',
	title: 'V',
	...(cautions && { cautions }),
	verdict: { code: 'v', severity, repair, risks }
});

describe('numbers with units', () => {
	it.each([
		'Standby draw under 0.02 A',
		'Bake at 125 °C',
		'bake at 125°C',
		'Wait 5 min',
		'isopropyl alcohol of 99 % or more',
		'99% strength',
		'about 3.4 V on the cell',
		'20 mA',
		'50 µA',
		'a 1,5 V line',
		'within 5 K of the water',
		'reading 30 Ω',
		'reading 30 Ω (the ohm sign)',
		'wait 5 mins',
		'30 kΩ',
		'10 ppm',
		'2 mm gap',
		'at 1 m depth',
		'9 h bake',
		'30 s dwell',
		'5 W'
	])('finds one in "%s"', (text) => {
		expect(NUMBER_WITH_UNIT.test(text)).toBe(true);
	});

	it.each([
		'Sn63Pb37 solder',
		'MSL 5a part',
		'step 3 of the list',
		'3 sensors',
		'2 hours', // a word, not the unit h: the rule names the units
		'take 2 more',
		'x10 magnification'
	])('finds none in "%s"', (text) => {
		expect(NUMBER_WITH_UNIT.test(text)).toBe(false);
	});
});

describe('provenance', () => {
	it('is needed by a step that states a number with a unit, and then enough', () => {
		expect(codes({ body: 'Let it dry for 30 min.' })).toEqual(['provenance-missing']);
		expect(
			codes({
				body: 'Let it dry for 30 min.',
				provenance: [{ about: '30 min drying', basis: 'common-practice' }]
			})
		).toEqual([]);
	});

	it('is needed by a measure step with ranges even when its text has no number', () => {
		const m = { kind: 'measure', title: 'Draw', unit: 'A', ranges: [{ next: 'fine' }] };
		expect(codes(m)).toEqual(['provenance-missing']);
		expect(codes({ ...m, provenance: [{ about: 'the bands', basis: 'maker' }] })).toEqual([]);
	});

	it('counts an empty list as none', () => {
		expect(codes({ title: 'Bake at 125 °C', provenance: [] })).toEqual(['provenance-missing']);
	});

	it('says what to add', () => {
		const [p] = problemsOf({ body: 'Bake at 125 °C.' });
		expect(p.message).toContain('"125 °C"');
		expect(p.message).toContain('Add provenance:');
		expect(p.path).toEqual(['steps', 'a', 'provenance']);
	});

	it('needs a source when the basis is published, and only then', () => {
		const entry = (basis: string, source?: string) => ({
			provenance: [{ about: 'x', basis, ...(source && { source }) }]
		});
		expect(codes(entry('published'))).toEqual(['provenance-unsourced']);
		expect(codes(entry('published', 'IPC/JEDEC J-STD-033, table 4-1'))).toEqual([]);
		expect(codes(entry('maker'))).toEqual([]);
		expect(codes(entry('common-practice'))).toEqual([]);
		const [p] = problemsOf(entry('published'));
		expect(p.path).toEqual(['steps', 'a', 'provenance', 0, 'source']);
		expect(p.message).toContain('Add source:');
	});
});

describe('cautions the text calls for', () => {
	it.each([
		['Preheat the board', ['hot-air', 'battery']],
		['Use hot air at the shield', ['hot-air', 'battery']],
		['Reflow the connector', ['hot-air', 'battery']],
		['Open it with the least heat that softens the adhesive', ['opening-heat', 'battery']],
		['Soften the adhesive on a heat pad', ['opening-heat', 'battery']],
		['Solder a jumper', ['flux-fume', 'lead', 'eye']],
		['Add flux and wick the pads', ['flux-fume', 'lead', 'eye']],
		['Reball the chip', ['flux-fume', 'lead', 'eye']],
		['Scrub with isopropyl', ['solvent']],
		['Rinse with alcohol', ['solvent']],
		['Cure under the UV lamp', ['uv', 'uv-resin']],
		['Freeze spray on the rail', ['freeze-spray']],
		['Clean in the ultrasonic tank', ['ultrasonic']],
		['Connect the bench power supply', ['bench-supply']],
		['Connect the bench supply', ['bench-supply']],
		['Connect the bench\n   power supply (words broken across lines)', ['bench-supply']],
		['Open the\n   phone', ['eye']],
		['Pry the screen up', ['eye']],
		['Open the phone', ['eye']],
		['Connect a charger', ['charging-wet']],
		['Watch it charging', ['charging-wet']],
		['Electrolyte on the frame', ['electrolyte']]
	])('"%s" needs %j', (title, needs) => {
		const [p, ...rest] = problemsOf({ title });
		expect(rest).toEqual([]);
		expect(p.code).toBe('caution-missing');
		for (const word of needs) expect(p.message).toContain(word);
		expect(codes({ title, cautions: needs })).toEqual([]);
	});

	it('lists every hazard it read in one problem', () => {
		const [p, ...rest] = problemsOf({ title: 'Add flux, cure the UV mask, then connect the bench supply' });
		expect(rest).toEqual([]);
		expect(p.message).toMatch(
			/^The text mentions "flux", "UV" and "bench supply", so the step needs the cautions flux-fume, lead, eye, uv, uv-resin, bench-supply\./
		);
	});

	it('reports only the words the step lacks', () => {
		const [p] = problemsOf({ title: 'Solder a jumper', cautions: ['lead', 'eye'] });
		expect(p.message).toMatch(/needs the caution flux-fume\. Add it to the step's cautions/);
	});

	it('reads the body and a verdict repair and risks, case-insensitively', () => {
		expect(codes({ body: 'Then REFLOW it.' })).toEqual(['caution-missing']);
		expect(codes(verdictStep('board-level', 'Reball; new adhesive and seals.'))).toEqual(['caution-missing']);
		expect(codes(verdictStep('no-fault', '-', 'Do not leave it charging unattended.'))).toEqual([
			'caution-missing'
		]);
	});

	it('leaves words that only look alike alone', () => {
		expect(codes({ title: 'Check the soldered-on shield is flat' })).toEqual(['caution-missing']);
		expect(codes({ title: 'Note the purple residue; the chargeable cell' })).toEqual([]);
		expect(codes({ title: 'No heat while it is wet' })).toEqual([]);
	});
});

describe('verdict severity and water resistance', () => {
	const solder = ['flux-fume', 'lead', 'eye'];
	const hot = ['hot-air', 'battery'];

	it('calls a verdict whose repair solders or uses hot air board work', () => {
		const repair = 'Solder in the new connector; new adhesive and seals.';
		expect(codes(verdictStep('replace', repair, seals, solder))).toEqual(['severity-mismatch']);
		expect(
			codes(verdictStep('repair', 'Hot air on the shield; new adhesive and seals.', seals, hot))
		).toEqual(['severity-mismatch']);
		expect(codes(verdictStep('board-level', repair, seals, solder))).toEqual([]);
		expect(codes(verdictStep('uneconomic', repair, seals, solder))).toEqual([]);
	});

	it('reads only the repair for the severity, not the risks', () => {
		const risks = `${seals} Board work with hot air may follow.`;
		expect(codes(verdictStep('replace', 'Swap the module; new adhesive and seals.', risks, hot))).toEqual([]);
	});

	it('asks every opening verdict for water resistance in its risks and seals in its repair', () => {
		for (const severity of ['repair', 'replace', 'board-level']) {
			const found = problemsOf(verdictStep(severity, 'Clean the connector.', 'Corrosion may return.'));
			expect(found.map((p) => [p.code, p.path?.at(-1)])).toEqual([
				['water-resistance-missing', 'risks'],
				['water-resistance-missing', 'repair']
			]);
			expect(found[0].message).toContain('Add that sentence to risks');
			expect(found[1].message).toContain('Add that step to repair');
		}
		expect(codes(verdictStep('repair', 'Clean; fit a new seal.'))).toEqual([]);
		// Block text wraps: the words may sit on two lines.
		const wrapped = 'Once opened, its water\n   resistance is no longer assured unless new seals are fitted.';
		expect(codes(verdictStep('repair', 'Clean; fit a new seal.', wrapped))).toEqual([]);
		expect(codes(verdictStep('no-fault', 'Nothing to do.', 'None.'))).toEqual([]);
		expect(codes(verdictStep('uneconomic', 'Return unrepaired.', 'None.'))).toEqual([]);
	});
});
