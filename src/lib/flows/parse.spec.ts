import { describe, expect, it } from 'vitest';
import { MAX_FLOW_CHARS, parseFlow } from './parse';

const good = `id: tiny
title: Tiny
summary: s
symptoms: []
start: a
steps:
  a:
    kind: test
    title: Look
    minutes: 1
    outcomes:
      - { label: Done, next: x }
  x:
    kind: verdict
    title: X
    verdict: { code: x, severity: no-fault, repair: none, risks: none }
`;

function problemsOf(text: string) {
	const result = parseFlow(text);
	expect(result.ok).toBe(false);
	return result.ok ? [] : result.problems;
}

describe('parseFlow', () => {
	it('parses a minimal flow', () => {
		const result = parseFlow(good);
		expect(result.ok && result.definition.start).toBe('a');
	});

	it('locates a missing key at its mapping and a bad value at its key', () => {
		const problems = problemsOf(
			good.replace('    minutes: 1\n', '').replace('severity: no-fault', 'severity: maybe')
		);
		expect(problems.map((p) => [p.path?.join('.'), p.line])).toEqual([
			['steps.a.minutes', 7], // the step `a:` (line 7) lacks the key
			['steps.x.verdict.severity', 15] // line 16 before minutes was removed
		]);
		expect(problems[1].message).toContain(
			'must be one of repair, replace, board-level, uneconomic, no-fault'
		);
	});

	it('reports a YAML syntax error with its line', () => {
		const [p] = problemsOf(good.replace('title: Look', 'title: [Look'));
		expect(p.code).toBe('schema');
		expect(p.message).toMatch(/^YAML: /);
		expect(p.line).toBeGreaterThanOrEqual(10);
	});

	it('refuses duplicate keys', () => {
		const [p] = problemsOf(good.replace('title: Tiny', 'title: Tiny\ntitle: Again'));
		expect(p.message).toMatch(/unique/i);
		expect(p.line).toBe(3);
	});

	it('refuses language-specific tags instead of running or resolving them', () => {
		const problems = problemsOf(good.replace('summary: s', 'summary: !!js/function "return 1"'));
		expect(problems[0].message).toMatch(/tag/i);
	});

	it('caps alias expansion ("billion laughs")', () => {
		const bomb = ['a: &a [x, x, x, x, x, x, x, x, x, x]'];
		for (let i = 1; i < 8; i++) {
			const prev = String.fromCharCode(96 + i);
			const name = String.fromCharCode(97 + i);
			bomb.push(
				`${name}: &${name} [*${prev}, *${prev}, *${prev}, *${prev}, *${prev}, *${prev}, *${prev}, *${prev}]`
			);
		}
		const [p] = problemsOf(bomb.join('\n'));
		expect(p.message).toMatch(/alias/i);
	});

	it('refuses an oversized file before parsing it', () => {
		const [p] = problemsOf(`# ${'x'.repeat(MAX_FLOW_CHARS)}\n${good}`);
		expect(p.message).toContain('at most');
	});

	it('refuses a file with several YAML documents', () => {
		expect(problemsOf(`${good}---\n${good}`)[0].code).toBe('schema');
	});

	it('reports an empty file as a shape problem', () => {
		expect(problemsOf('')[0].message).toContain('should be a mapping');
	});
});
