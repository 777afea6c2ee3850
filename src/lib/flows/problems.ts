/** Problems found in a flow, by parseFlow (YAML and shape) and checkFlow (the graph). */
import type { z } from 'zod';

export const PROBLEM_CODES = [
	'schema',
	'missing-start',
	'unknown-target',
	'unreachable-step',
	'dead-end',
	'verdict-has-exits',
	'no-exits',
	'duplicate-label',
	'duplicate-verdict-code',
	'range-gap',
	'range-overlap',
	'range-empty',
	'range-outside-domain',
	'unknown-caution',
	'id-mismatch',
	'provenance-missing',
	'provenance-unsourced',
	'caution-missing',
	'severity-mismatch',
	'water-resistance-missing'
] as const;
export type ProblemCode = (typeof PROBLEM_CODES)[number];

export type FlowPath = (string | number)[];

export interface FlowProblem {
	code: ProblemCode;
	/** Id of the step the problem sits in, when it sits in one. */
	step?: string;
	message: string;
	/** Where in the definition, e.g. ['steps', 'boot-current', 'ranges', 1]. */
	path?: FlowPath;
	/** 1-based line and column in the YAML text, when the problem came from a file. */
	line?: number;
	column?: number;
}

/** `steps.boot-current.ranges[1].min` */
export function formatPath(path: readonly PropertyKey[]): string {
	let out = '';
	for (const key of path) {
		if (typeof key === 'number') out += `[${key}]`;
		else out += out ? `.${String(key)}` : String(key);
	}
	return out || '(top level)';
}

const nouns: Record<string, string> = {
	string: 'text',
	number: 'a number',
	array: 'a list',
	object: 'a mapping of keys to values',
	boolean: 'yes/no'
};

function describeValue(value: unknown): string {
	if (value === undefined) return 'nothing';
	if (value === null) return 'an empty value';
	if (Array.isArray(value)) return 'a list';
	if (typeof value === 'number' && !Number.isFinite(value)) return String(value);
	return nouns[typeof value] ?? typeof value;
}

function issueText(issue: z.core.$ZodIssue): string {
	switch (issue.code) {
		case 'invalid_type':
			if (issue.input === undefined)
				return `is required but missing (expected ${nouns[issue.expected] ?? issue.expected})`;
			return `should be ${nouns[issue.expected] ?? issue.expected}, found ${describeValue(issue.input)}`;
		case 'unrecognized_keys':
			return `has unknown key${issue.keys.length > 1 ? 's' : ''} ${issue.keys.map((k) => `"${k}"`).join(', ')} (check the spelling)`;
		case 'invalid_union':
			if ('discriminator' in issue && issue.discriminator === 'kind')
				return 'kind must be one of symptom, test, measure, verdict';
			return issue.message;
		case 'invalid_key':
			return `step id ${issue.issues[0]?.message ?? 'is not valid'}`;
		case 'invalid_value':
			return `must be one of ${issue.values.map((v) => String(v)).join(', ')}`;
		default:
			return issue.message;
	}
}

/** One `schema` problem per zod issue, with the path spelled out in the message. */
export function schemaProblems(error: z.ZodError): FlowProblem[] {
	return error.issues.map((issue) => {
		const path = issue.path.filter((k): k is string | number => typeof k !== 'symbol');
		const step = path[0] === 'steps' && typeof path[1] === 'string' ? path[1] : undefined;
		return { code: 'schema', step, path, message: `${formatPath(path)}: ${issueText(issue)}` };
	});
}
