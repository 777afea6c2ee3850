import { readFileSync, readdirSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { checkFlow, PROBLEM_CODES, type ProblemCode } from './check';
import { checkFlowText, parseFlow } from './parse';
import type { FlowDefinition } from './schema';

const fixtures = new URL('../../../tests/fixtures/flows/', import.meta.url);
const flowsDir = new URL('../../../flows/', import.meta.url);
const read = (dir: URL, name: string) => readFileSync(new URL(name, dir), 'utf8');

function checkFixture(code: string) {
	return checkFlowText(read(fixtures, `${code}.flow.yaml`), { fileStem: code });
}

/** Each crafted fixture breaks exactly one rule; [code, step] pairs the checker must report. */
const expected: Record<ProblemCode, [ProblemCode, string | undefined][]> = {
	schema: [['schema', 'open-and-look']],
	'missing-start': [['missing-start', undefined]],
	'unknown-target': [['unknown-target', 'symptom']],
	'unreachable-step': [['unreachable-step', 'old-check']],
	'dead-end': [
		['dead-end', 'clean-connector'],
		['dead-end', 'dry-longer']
	],
	'verdict-has-exits': [['verdict-has-exits', 'cleaned']],
	'no-exits': [['no-exits', 'listen-closely']],
	'duplicate-label': [['duplicate-label', 'symptom']],
	'duplicate-verdict-code': [['duplicate-verdict-code', 'board-fault']],
	'range-gap': [['range-gap', 'speaker-resistance']],
	'range-overlap': [['range-overlap', 'speaker-resistance']],
	'range-empty': [['range-empty', 'speaker-resistance']],
	'range-outside-domain': [['range-outside-domain', 'speaker-resistance']],
	'unknown-caution': [['unknown-caution', 'open-and-look']],
	'id-mismatch': [['id-mismatch', undefined]],
	'provenance-missing': [['provenance-missing', 'speaker-resistance']],
	'provenance-unsourced': [['provenance-unsourced', 'speaker-resistance']],
	'caution-missing': [['caution-missing', 'clean-connector']],
	'severity-mismatch': [['severity-mismatch', 'replace-speaker']],
	'water-resistance-missing': [['water-resistance-missing', 'cleaned']]
};

describe('checkFlow on the crafted fixtures', () => {
	it('passes the valid fixture, which has a loop that can exit', () => {
		const result = checkFixture('valid');
		expect(result.problems).toEqual([]);
		expect(result.ok).toBe(true);
		expect(result.stats?.acyclic).toBe(false);
	});

	it.each(PROBLEM_CODES.map((c) => [c]))('reports %s at the right step and nothing else', (code) => {
		const result = checkFixture(code);
		expect(result.ok).toBe(false);
		expect(result.problems.map((p) => [p.code, p.step])).toEqual(expected[code]);
		for (const p of result.problems) {
			expect(p.message.length).toBeGreaterThan(20);
			expect(p.line).toBeGreaterThan(0);
		}
	});

	it('has a fixture for every code', () => {
		const names = readdirSync(fixtures).filter((n) => n.endsWith('.flow.yaml'));
		expect(names.sort()).toEqual([...PROBLEM_CODES, 'valid'].map((c) => `${c}.flow.yaml`).sort());
	});

	it('spells out the path and line of a schema problem', () => {
		const [problem] = checkFixture('schema').problems;
		expect(problem.path).toEqual(['steps', 'open-and-look', 'minutes']);
		expect(problem.message).toContain('steps.open-and-look.minutes');
		// Line 21 of tests/fixtures/flows/schema.flow.yaml is `    minutes: ten`.
		expect(problem.line).toBe(21);
	});

	it('names both ranges and the overlapping readings', () => {
		const [p] = checkFixture('range-overlap').problems;
		expect(p.message).toContain('range 2 (20–45 Ω) and range 3 (40 Ω and above)');
		expect(p.message).toContain('from 40 up to 45 Ω');
	});
});

describe('the shipped flows', () => {
	const names = readdirSync(flowsDir).filter((n) => n.endsWith('.flow.yaml'));
	it('exist and pass the check', () => {
		expect(names.length).toBeGreaterThan(0);
		for (const name of names) {
			const result = checkFlowText(read(flowsDir, name), { fileStem: name.replace('.flow.yaml', '') });
			expect(result.problems, name).toEqual([]);
		}
	});
});

/** A definition built in code; `steps` entries are shorthand for the shape checks don't care about. */
function flow(steps: Record<string, unknown>, start = 'a'): FlowDefinition {
	return { id: 'inline', title: 'Inline', summary: 's', symptoms: [], start, steps } as FlowDefinition;
}
const verdict = (code: string) => ({
	kind: 'verdict',
	title: code,
	// no-fault: the trade rules of repairing verdicts have tests of their own (rules.spec.ts)
	verdict: { code, severity: 'no-fault', repair: 'r', risks: 'k' }
});
const test = (minutes: number, ...next: string[]) => ({
	kind: 'test',
	title: 't',
	minutes,
	outcomes: next.map((n, i) => ({ label: `answer ${i}`, next: n }))
});
const measure = (domain: object | undefined, ranges: object[]) => ({
	kind: 'measure',
	title: 'm',
	minutes: 1,
	unit: 'V',
	provenance: [{ about: 'the bands', basis: 'common-practice' }],
	...(domain && { domain }),
	ranges
});

describe('checkFlow stats', () => {
	it('counts steps and routes on a hand-computed diamond', () => {
		// a(2) → b(5) → x ; a → c(1) → d(1) → x ; c → y. Worked by hand:
		// x: fewest steps 2 via a→b, fewest minutes 4 via a→c→d (2+1+1); y: 2 steps, 3 minutes.
		// Longest: 3 steps (a→c→d→x), 7 minutes (a→b→x = 2+5).
		const result = checkFlow(
			flow({
				a: test(2, 'b', 'c'),
				b: test(5, 'x'),
				c: test(1, 'd', 'y'),
				d: test(1, 'x'),
				x: verdict('x'),
				y: verdict('y')
			})
		);
		expect(result.problems).toEqual([]);
		expect(result.stats).toEqual({
			steps: 6,
			byKind: { symptom: 0, test: 4, measure: 0, verdict: 2 },
			verdicts: ['x', 'y'],
			acyclic: true,
			shortest: { x: { steps: 2, minutes: 4 }, y: { steps: 2, minutes: 3 } },
			longest: { steps: 3, minutes: 7 }
		});
	});

	it('allows a loop with a way out and reports no longest route for it', () => {
		const result = checkFlow(flow({ a: test(30, 'a', 'x'), x: verdict('x') }));
		expect(result.ok).toBe(true);
		expect(result.stats?.acyclic).toBe(false);
		expect(result.stats?.longest).toBeNull();
		expect(result.stats?.shortest).toEqual({ x: { steps: 1, minutes: 30 } });
	});

	it('reports a self-loop with no way out as a dead end', () => {
		const result = checkFlow(flow({ a: test(1, 'b', 'x'), b: test(1, 'b'), x: verdict('x') }));
		expect(result.problems.map((p) => [p.code, p.step])).toEqual([['dead-end', 'b']]);
	});

	it('reports one problem, not a cascade, for a step pointing nowhere', () => {
		const result = checkFlow(flow({ a: test(1, 'b', 'x'), b: test(1, 'nowhere'), x: verdict('x') }));
		expect(result.problems.map((p) => p.code)).toEqual(['unknown-target']);
	});

	it('returns only schema problems, with paths, for a malformed definition', () => {
		const result = checkFlow({ id: 'Not Kebab', steps: { a: { kind: 'guess' } } });
		expect(result.ok).toBe(false);
		expect(result.stats).toBeNull();
		expect(result.problems.every((p) => p.code === 'schema')).toBe(true);
		const paths = result.problems.map((p) => p.path?.join('.'));
		expect(paths).toEqual(expect.arrayContaining(['id', 'title', 'start', 'steps.a.kind']));
	});

	it('refuses Infinity and NaN as numbers', () => {
		const result = checkFlow(
			flow({ a: measure({ min: 0 }, [{ min: 0, max: Infinity, next: 'x' }]), x: verdict('x') })
		);
		expect(result.problems.map((p) => [p.code, p.path?.join('.')])).toEqual([
			['schema', 'steps.a.ranges.0.max']
		]);
	});
});

describe('range coverage', () => {
	const codes = (domain: object | undefined, ranges: object[]) =>
		checkFlow(flow({ a: measure(domain, ranges), x: verdict('x') })).problems.map((p) => p.code);

	it('accepts ranges that meet exactly (max of one = min of the next)', () => {
		expect(
			codes({ min: 0 }, [
				{ max: 0.01, next: 'x' },
				{ min: 0.01, max: 0.5, next: 'x' },
				{ min: 0.5, next: 'x' }
			])
		).toEqual([]);
	});

	it('needs a range for the inclusive top of the domain', () => {
		const ranges = [
			{ min: 0, max: 50, next: 'x' },
			{ min: 50, max: 100, next: 'x' }
		];
		expect(codes({ min: 0, max: 100 }, ranges)).toEqual(['range-gap']);
		expect(codes({ min: 0, max: 100 }, [ranges[0], { min: 50, next: 'x' }])).toEqual([]);
	});

	it('finds a gap below the first range when the domain is open', () => {
		expect(codes(undefined, [{ min: 0, next: 'x' }])).toEqual(['range-gap']);
		expect(codes(undefined, [{ next: 'x' }])).toEqual([]);
	});

	it('reports an empty domain (min above max) as range-empty', () => {
		expect(codes({ min: 5, max: 1 }, [{ next: 'x' }])).toEqual(['range-empty']);
	});

	it('does not flag a range that only partly leaves the domain', () => {
		expect(
			codes({ min: 0 }, [
				{ min: -5, max: 1, next: 'x' },
				{ min: 1, next: 'x' }
			])
		).toEqual([]);
	});

	it('reports an empty measure as no-exits, not also as a gap', () => {
		// x is unreachable because nothing leads to it any more.
		expect(codes({ min: 0 }, [])).toEqual(['no-exits', 'unreachable-step']);
	});
});

describe('parseFlow', () => {
	it('returns the definition of a good file', () => {
		const result = parseFlow(read(fixtures, 'valid.flow.yaml'));
		expect(result.ok && result.definition.steps['speaker-resistance'].kind).toBe('measure');
	});
});
