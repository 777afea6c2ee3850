import fs from 'node:fs';
import path from 'node:path';
import fc from 'fast-check';
import { beforeAll, describe, expect, it } from 'vitest';
import { buildWorld, type World } from '$lib/server/testing/world';
import { quietAuthLog, type Jar } from '$lib/server/testing/events';
import { discoverEntries, routesDir } from './routes';
import { call, fingerprint, signInJar } from './harness';
import { samples } from './fuzz-bodies';

// Fuzzed bodies for every JSON route: a valid body with one value replaced by something hostile
// (NUL, lone surrogates, very long, right-to-left, template and markup syntax, ids that are no
// UUIDs, wrong types). No answer may be a 5xx, and a refused request must change nothing stored.

const jsonEntries = discoverEntries().filter(
	(e) =>
		e.kind === 'method' &&
		['POST', 'PUT', 'PATCH'].includes(e.name) &&
		/readJson\(|request\.json\(|request\.text\(/.test(fs.readFileSync(path.join(routesDir, e.file), 'utf8'))
);

const loneSurrogate = fc.integer({ min: 0xd800, max: 0xdfff }).map((c) => String.fromCharCode(c));
export const hostileString = fc.oneof(
	fc.constantFrom(
		'\u0000',
		'note\u0000with NUL',
		'\udfff',
		'tail \ud800',
		'\u202eevil.exe\u202c',
		'مرحبا \u200f עברית',
		'{{constructor.constructor("return process")()}}',
		'${process.exit(1)}',
		'<script>window.__xss=1</script>',
		"'; drop table jobs; --",
		'__proto__',
		'../../../etc/passwd',
		'%00%0d%0a',
		'\r\nBcc: x@evil.test',
		'x'.repeat(200_000),
		'é'.repeat(20_000),
		'😀'.repeat(5_000)
	),
	fc.tuple(fc.string({ maxLength: 20 }), loneSurrogate, fc.string({ maxLength: 20 })).map((p) => p.join('')),
	fc.string({ unit: 'binary', maxLength: 50 })
);
const hostileId = fc.constantFrom(
	'-'.repeat(36),
	'f'.repeat(36),
	'ffffffff-ffff-ffff-ffff-fffffffffffg',
	'00000000-0000-0000-0000-000000000000',
	'3f2b8c1e-9a4d-4e7f-8b6a-1c2d3e4f5a6b' // well-formed, belongs to nothing
);
const hostileValue = fc.oneof(
	{ weight: 4, arbitrary: hostileString },
	{ weight: 2, arbitrary: hostileId },
	fc.constantFrom(null, true, -1, 1e308, 2 ** 53, [], {}, ['x'], { $gt: '' })
);

/** Paths of every leaf (and every object, for an added key) in a JSON value. */
function paths(value: unknown, at: (string | number)[] = []): (string | number)[][] {
	if (Array.isArray(value)) return [at, ...value.flatMap((v, i) => paths(v, [...at, i]))];
	if (value && typeof value === 'object')
		return [at, ...Object.entries(value).flatMap(([k, v]) => paths(v, [...at, k]))];
	return [at];
}

function replaced(body: unknown, at: (string | number)[], value: unknown, key: string): unknown {
	if (at.length === 0) {
		// An object gets a hostile extra key; a leaf is replaced.
		if (body && typeof body === 'object' && !Array.isArray(body)) return { ...body, [key]: value };
		return value;
	}
	const [head, ...rest] = at;
	const copy = (Array.isArray(body) ? [...body] : { ...(body as object) }) as Record<
		string | number,
		unknown
	>;
	copy[head] = replaced(copy[head], rest, value, key);
	return copy;
}

let w: World;
let jar: Jar;

beforeAll(async () => {
	quietAuthLog();
	w = await buildWorld();
	jar = await signInJar(w.lead.email); // the lead holds every role, so access never masks a fault
}, 120_000);

describe('fuzzed JSON bodies', () => {
	it('has a valid sample body for every JSON route (add new ones to fuzz-bodies.ts)', () => {
		const missing = jsonEntries.map((e) => e.key).filter((k) => !(k in samples));
		expect(missing).toEqual([]);
		expect(jsonEntries.length).toBeGreaterThanOrEqual(10);
	});

	it.each(jsonEntries.map((e) => [e.key, e] as const))('%s', async (_key, entry) => {
		const sample = await samples[entry.key](w);
		if ('skip' in sample) return void expect(sample.skip).toBeTruthy();
		const leaves = paths(sample.body);
		const faults: string[] = [];
		await fc.assert(
			fc.asyncProperty(
				fc.nat({ max: leaves.length - 1 }),
				hostileValue,
				hostileString,
				async (i, value, key) => {
					const body = JSON.stringify(replaced(sample.body, leaves[i], value, key));
					const before = await fingerprint();
					const o = await call(entry, w, { jar, body, params: sample.params });
					if (o.status >= 500)
						faults.push(
							`${o.status} at ${leaves[i].join('.')}: ${String((o.error as Error)?.message ?? '')}`
						);
					if (o.status >= 400 && (await fingerprint()) !== before)
						faults.push(`refused (${o.status}) but changed stored data at ${leaves[i].join('.')}`);
					return faults.length === 0;
				}
			),
			{ numRuns: 30, seed: Number(process.env.FUZZ_SEED ?? 20261204) }
		);
		// The unspoilt sample is accepted or refused by a rule, never a fault.
		const plain = await call(entry, w, { jar, body: JSON.stringify(sample.body), params: sample.params });
		expect(plain.status).toBeLessThan(500);
		expect(faults).toEqual([]);
	});
});
