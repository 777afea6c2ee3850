import fs from 'node:fs';
import { describe, expect, it } from 'vitest';
import { parseFlow } from '$lib/flows/parse';
import { canonicalJson, checksumOf, sha256Hex } from './checksum';

describe('canonical JSON and checksum', () => {
	it('hashes with SHA-256', () => {
		// FIPS 180-2, Appendix B.1: the one-block message "abc".
		expect(sha256Hex('abc')).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
	});

	it('sorts keys at every depth, keeps array order, drops undefined and adds no whitespace', () => {
		// Expected text worked out by hand from RFC 8785 §3.2 (sorted keys, no whitespace).
		expect(canonicalJson({ b: 1, a: [{ d: 2, c: 3 }, 'x'], e: undefined, f: { z: null, y: true } })).toBe(
			'{"a":[{"c":3,"d":2},"x"],"b":1,"f":{"y":true,"z":null}}'
		);
		// Sorted by UTF-16 code units, as RFC 8785 §3.2.3 asks: upper case before lower case.
		expect(canonicalJson({ b: 1, B: 2, a: 3 })).toBe('{"B":2,"a":3,"b":1}');
	});

	it('gives a flow the same checksum whatever the order of its keys, and a different one for any change', () => {
		const parsed = parseFlow(fs.readFileSync('flows/restart-loop-after-liquid.flow.yaml', 'utf8'));
		if (!parsed.ok) throw new Error('the shipped flow should parse');
		const def = parsed.definition;
		const reversed = (o: object) => Object.fromEntries(Object.entries(o).reverse());
		const shuffled = {
			...reversed(def),
			steps: reversed(Object.fromEntries(Object.entries(def.steps).map(([id, s]) => [id, reversed(s)])))
		};
		expect(Object.keys(shuffled)).not.toEqual(Object.keys(def));
		expect(checksumOf(shuffled)).toBe(checksumOf(def));
		expect(checksumOf({ ...def, title: def.title + '.' })).not.toBe(checksumOf(def));
		expect(checksumOf(def)).toMatch(/^[0-9a-f]{64}$/);
	});
});
