/**
 * Every handbook value the shipped flows and the cautions quote matches the reference table in
 * trade-values.ts (sources named there and beside each check below).
 */
import { readFileSync, readdirSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { parse } from 'yaml';
import { CAUTIONS } from './cautions';
import { scanQuotes } from './trade-values';

/** All strings of a parsed YAML value, joined: titles, bodies, repairs, risks, labels, provenance. */
function strings(value: unknown): string[] {
	if (typeof value === 'string') return [value];
	if (Array.isArray(value)) return value.flatMap(strings);
	if (value && typeof value === 'object') return Object.values(value).flatMap(strings);
	return [];
}

const flowsDir = new URL('../../../flows/', import.meta.url);
const shipped = readdirSync(flowsDir).filter((n) => n.endsWith('.flow.yaml'));
const flowTexts = shipped.map((name) => ({
	name,
	texts: strings(parse(readFileSync(new URL(name, flowsDir), 'utf8')))
}));
const cautionTexts = Object.values(CAUTIONS).map((c) => `${c.rule} ${c.why}`);

const judge = (text: string) => scanQuotes(text).map((q) => [q.what, q.ok]);

describe('the reference table of quoted values', () => {
	it.each([
		// IPC/JEDEC J-STD-033, 125 °C bake, parts up to 1.4 mm (published)
		['MSL 2a 5 h', 'MSL 2a bake'],
		['MSL 3 9 h', 'MSL 3 bake'],
		['MSL 4: 11 h', 'MSL 4 bake'],
		['MSL 5 12 h', 'MSL 5 bake'],
		['MSL 5a 16 h', 'MSL 5a bake'],
		['per IPC/JEDEC J-STD-033 (125 °C', 'J-STD-033 bake temperature'],
		// Solder alloys, handbook values (J-STD-006 notes, informative)
		['Sn63Pb37 183 °C', 'Sn63Pb37 melting'],
		['Sn60Pb40 (183–190 °C)', 'Sn60Pb40 melting'],
		['Sn60Pb40 liquidus 188 °C', 'Sn60Pb40 melting'],
		['Sn42Bi58 paste (liquidus 138 °C)', 'Sn42Bi58 melting'],
		['Sn42Bi57Ag1 137–139 °C', 'Sn42Bi57Ag1 melting'],
		['Sn96.5Ag3.0Cu0.5 220 °C', 'Sn96.5Ag3.0Cu0.5 melting'],
		['Sn96.5Ag3.0Cu0.5 217–220 °C', 'Sn96.5Ag3.0Cu0.5 melting'],
		['Sn96.5Ag3.5 221 °C', 'Sn96.5Ag3.5 melting'],
		['Sn99.3Cu0.7 227 °C', 'Sn99.3Cu0.7 melting'],
		// IPC/JEDEC J-STD-020 classification temperatures (published; Sn-Pb rev D from memory)
		[
			'J-STD-020 classification temperature (260 °C for thin lead-free packages)',
			'classification temperature'
		],
		['the J-STD-020 peak for this Sn-Pb part, 235 °C', 'classification temperature'],
		// NIOSH Pocket Guide, isopropyl alcohol (published)
		['flash point of 11.7 °C', 'isopropyl alcohol flash point'],
		['flash point 53 °F', 'isopropyl alcohol flash point'],
		['isopropyl alcohol vapour burns between 2.0 % and 12.7 %', 'isopropyl alcohol explosive limits'],
		// NIOSH Pocket Guide, hydrogen fluoride (from memory)
		['hydrogen fluoride at REL 3 ppm TWA, 6 ppm ceiling', 'hydrogen fluoride limits']
	])('accepts "%s"', (text, what) => {
		expect(judge(text)).toEqual([[what, true]]);
	});

	it.each([
		['MSL 3 8 h', 'MSL 3 bake'], // J-STD-033: 9 h
		['MSL 5a 12 h', 'MSL 5a bake'], // J-STD-033: 16 h
		['MSL 6 4 h', 'MSL 6 bake'], // not in the table at all
		['J-STD-033 bake at 150 °C', 'J-STD-033 bake temperature'], // the table is for 125 °C
		['Sn63Pb37 190 °C', 'Sn63Pb37 melting'], // eutectic, 183 °C
		['Sn60Pb40 183–195 °C', 'Sn60Pb40 melting'], // liquidus 188–191 °C
		['Sn42Bi58 183 °C', 'Sn42Bi58 melting'], // 138 °C
		['Sn96.5Ag3.0Cu0.5 227 °C', 'Sn96.5Ag3.0Cu0.5 melting'], // 217/220 °C
		['Sn62Pb36Ag2 179 °C', 'Sn62Pb36Ag2 melting'], // not in the table: add it with a source first
		['J-STD-020 lead-free peak 235 °C', 'classification temperature'], // 235 is the Sn-Pb figure
		['flash point of 12 °C', 'isopropyl alcohol flash point'], // 11.7 °C
		['isopropyl alcohol burns between 2 % and 12 %', 'isopropyl alcohol explosive limits'], // 2.0–12.7 %
		['hydrogen fluoride at REL 5 ppm TWA, 6 ppm ceiling', 'hydrogen fluoride limits'] // 3 ppm
	])('refuses "%s"', (text, what) => {
		expect(judge(text)).toEqual([[what, false]]);
	});

	it('reads values across YAML line folds and several quotes in one text', () => {
		const text =
			'Handbook liquidus: Sn63Pb37\n      183 °C, Sn96.5Ag3.0Cu0.5 220 °C. Bake per J-STD-033 (125 °C, MSL 3 9 h, MSL 4 11 h).';
		expect(judge(text)).toEqual([
			['MSL 3 bake', true],
			['MSL 4 bake', true],
			['J-STD-033 bake temperature', true],
			['Sn63Pb37 melting', true],
			['Sn96.5Ag3.0Cu0.5 melting', true]
		]);
	});
});

describe('quoted values in what ships', () => {
	it.each(flowTexts.map((f) => [f.name, f.texts] as const))(
		'%s quotes only tabled values',
		(_name, texts) => {
			const wrong = texts.flatMap(scanQuotes).filter((q) => !q.ok);
			expect(wrong.map((q) => `${q.found} — expected ${q.expected}`)).toEqual([]);
		}
	);

	it('the cautions quote only tabled values, and the flash point is among them', () => {
		const quotes = cautionTexts.flatMap(scanQuotes);
		expect(quotes.filter((q) => !q.ok)).toEqual([]);
		expect(quotes.map((q) => q.what)).toEqual(
			expect.arrayContaining([
				'isopropyl alcohol flash point',
				'isopropyl alcohol explosive limits',
				'hydrogen fluoride limits'
			])
		);
	});

	it('finds the handbook values the flows quote (so the scan is not silently blind)', () => {
		const found = new Set(
			flowTexts.flatMap((f) => f.texts.flatMap(scanQuotes)).map((q) => q.what.split(' ')[0])
		);
		// Every shipped flow set so far quotes bake times and alloy melting points in its rework steps.
		expect([...found].some((w) => w === 'MSL')).toBe(true);
		expect([...found].some((w) => w.startsWith('Sn'))).toBe(true);
	});
});
