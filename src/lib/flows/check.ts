/**
 * checkFlow: proves a flow definition sound before anyone runs it. Pure and isomorphic; every
 * pass is linear in the number of steps and exits so a 2,000-step flow checks in milliseconds.
 */
import { CAUTION_CODES, isCaution } from './cautions';
import {
	buildGraph,
	fewestMinutes,
	fewestSteps,
	longestRoutes,
	reachable,
	reaching,
	topologicalOrder,
	type FlowGraph
} from './graph';
import { schemaProblems, type FlowProblem } from './problems';
import { rangeProblems } from './ranges';
import { ruleProblems } from './rules';
import { exitsOf, flowSchema, STEP_KINDS, type FlowDefinition, type StepKind } from './schema';

export { PROBLEM_CODES, formatPath, type FlowProblem, type ProblemCode } from './problems';

export interface Route {
	/** Steps worked through before the verdict (the verdict itself not counted). */
	steps: number;
	/** Sum of the `minutes` of those steps. */
	minutes: number;
}

export interface FlowStats {
	steps: number;
	byKind: Record<StepKind, number>;
	/** Verdict codes in file order. */
	verdicts: string[];
	/** Whether the steps reachable from `start` contain no loop. */
	acyclic: boolean;
	/** Per verdict code: fewest steps and (separately) fewest minutes from start. Unreachable verdicts are absent. */
	shortest: Record<string, Route>;
	/** Most steps and (separately) most minutes from start to any verdict; null when the flow has loops. */
	longest: Route | null;
}

export interface CheckResult {
	ok: boolean;
	problems: FlowProblem[];
	/** null when the definition does not even have the right shape. */
	stats: FlowStats | null;
	/** The validated definition, when it had the right shape. */
	definition?: FlowDefinition;
}

export interface CheckOptions {
	/** File name without `.flow.yaml`; the flow's id must equal it. */
	fileStem?: string;
}

/** Shape check only: the definition, or one `schema` problem per fault. */
export function validateFlow(
	input: unknown
): { ok: true; definition: FlowDefinition } | { ok: false; problems: FlowProblem[] } {
	const parsed = flowSchema.safeParse(input);
	if (parsed.success) return { ok: true, definition: parsed.data };
	// Only a failing definition pays for the offending values that make the messages concrete.
	const detailed = flowSchema.safeParse(input, { reportInput: true });
	return { ok: false, problems: schemaProblems(detailed.error ?? parsed.error) };
}

export function checkFlow(input: unknown, options: CheckOptions = {}): CheckResult {
	const valid = validateFlow(input);
	if (!valid.ok) return { ok: false, problems: valid.problems, stats: null };
	const def = valid.definition;
	const problems: FlowProblem[] = [];

	if (options.fileStem !== undefined && def.id !== options.fileStem)
		problems.push({
			code: 'id-mismatch',
			path: ['id'],
			message: `The flow's id "${def.id}" must equal its file name "${options.fileStem}.flow.yaml".`
		});

	const g = buildGraph(def);
	stepProblems(g, problems);

	if (g.start < 0)
		problems.push({
			code: 'missing-start',
			path: ['start'],
			message: `start names "${def.start}", but there is no step with that id.`
		});
	else {
		const seen = reachable(g);
		g.ids.forEach((id, i) => {
			if (!seen[i])
				problems.push({
					code: 'unreachable-step',
					step: id,
					path: ['steps', id],
					message: `No answer or reading leads here from the start step "${def.start}", so this step is never shown.`
				});
		});
	}
	deadEnds(g, problems);

	return { ok: problems.length === 0, problems, stats: stats(g), definition: def };
}

function stepProblems(g: FlowGraph, problems: FlowProblem[]) {
	const verdictCodes = new Map<string, string>();
	g.ids.forEach((id, i) => {
		const step = g.steps[i];
		const at = ['steps', id];
		ruleProblems(id, step, problems);
		for (const word of step.cautions ?? [])
			if (!isCaution(word))
				problems.push({
					code: 'unknown-caution',
					step: id,
					path: [...at, 'cautions'],
					message: `"${word}" is not a caution word. Use one of: ${CAUTION_CODES.join(', ')}.`
				});

		if (step.kind === 'verdict') {
			const exits = (step.outcomes?.length ?? 0) + (step.ranges?.length ?? 0);
			if (exits > 0)
				problems.push({
					code: 'verdict-has-exits',
					step: id,
					path: at,
					message:
						'A verdict ends the flow, so it cannot have outcomes or ranges. Move them to a test step before the verdict.'
				});
			const code = step.verdict.code;
			const first = verdictCodes.get(code);
			if (first !== undefined)
				problems.push({
					code: 'duplicate-verdict-code',
					step: id,
					path: [...at, 'verdict', 'code'],
					message: `Verdict code "${code}" is already used by step "${first}"; each verdict needs its own code so reports and statistics can tell them apart.`
				});
			else verdictCodes.set(code, id);
			return;
		}

		const choices = step.kind === 'measure' ? (step.ranges ?? []) : (step.outcomes ?? []);
		const key = step.kind === 'measure' ? 'ranges' : 'outcomes';
		if (choices.length === 0)
			problems.push({
				code: 'no-exits',
				step: id,
				path: at,
				message:
					step.kind === 'measure'
						? 'This measurement has no ranges, so no reading can lead anywhere. Add ranges with a next step each.'
						: `This ${step.kind} has no outcomes, so the technician cannot answer it. Add at least one outcome with a next step.`
			});

		const labels = new Map<string, number>();
		choices.forEach((choice, k) => {
			if (g.out[i][k] < 0)
				problems.push({
					code: 'unknown-target',
					step: id,
					path: [...at, key, k, 'next'],
					message: `${step.kind === 'measure' ? `Range ${k + 1}` : `Answer "${choice.label}"`} leads to "${choice.next}", but the flow has no step with that id.`
				});
			if (choice.label === undefined) return;
			const norm = choice.label.trim().toLowerCase();
			const before = labels.get(norm);
			if (before !== undefined)
				problems.push({
					code: 'duplicate-label',
					step: id,
					path: [...at, key, k, 'label'],
					message: `The label "${choice.label}" appears twice (${key} ${before + 1} and ${k + 1}); the technician could not tell them apart.`
				});
			else labels.set(norm, k);
		});

		if (step.kind === 'measure') problems.push(...rangeProblems(id, step));
	});
}

/**
 * A non-verdict step from which no verdict can be reached. Steps already reported for having no
 * exits or an unknown target count as "reported ends" so one mistake yields one problem.
 */
function deadEnds(g: FlowGraph, problems: FlowProblem[]) {
	const seeds: number[] = [];
	g.steps.forEach((s, i) => {
		if (s.kind === 'verdict' || g.out[i].length === 0 || g.out[i].includes(-1)) seeds.push(i);
	});
	const ok = reaching(g, seeds);
	g.ids.forEach((id, i) => {
		if (ok[i]) return;
		const next = [...new Set(exitsOf(g.steps[i]))];
		const shown = next.slice(0, 4).join(', ') + (next.length > 4 ? ', …' : '');
		problems.push({
			code: 'dead-end',
			step: id,
			path: ['steps', id],
			message: `No verdict can be reached from here: every route through ${shown} comes back round without a way out. Give one of these steps an answer that leads on to a verdict.`
		});
	});
}

function stats(g: FlowGraph): FlowStats {
	const byKind = Object.fromEntries(STEP_KINDS.map((k) => [k, 0])) as Record<StepKind, number>;
	const verdicts: string[] = [];
	for (const s of g.steps) {
		byKind[s.kind]++;
		if (s.kind === 'verdict') verdicts.push(s.verdict.code);
	}
	const result: FlowStats = {
		steps: g.ids.length,
		byKind,
		verdicts,
		acyclic: true,
		shortest: {},
		longest: null
	};
	if (g.start < 0) return result;

	const order = topologicalOrder(g, reachable(g));
	result.acyclic = order !== null;
	const [steps, minutes] = [fewestSteps(g), fewestMinutes(g)];
	const long = order && longestRoutes(g, order);
	let longest: Route | null = null;
	g.steps.forEach((s, i) => {
		if (s.kind !== 'verdict' || steps[i] === Infinity) return;
		const seen = result.shortest[s.verdict.code];
		// With duplicate codes keep the shorter route; the duplicate is reported anyway.
		if (!seen || steps[i] < seen.steps)
			result.shortest[s.verdict.code] = { steps: steps[i], minutes: minutes[i] };
		if (long)
			longest = {
				steps: Math.max(longest?.steps ?? 0, long.steps[i]),
				minutes: Math.max(longest?.minutes ?? 0, long.minutes[i])
			};
	});
	result.longest = longest;
	return result;
}
