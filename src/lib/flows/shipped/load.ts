/**
 * Test helpers for the shipped flow files. The specs read `flows/<id>.flow.yaml`; with
 * SHIPPED_FLOWS_DIR set they read another copy instead, e.g. version 1 taken from git, which is how
 * each fix is shown to fail on the version before it (see flows/README.md, "Changing a shipped flow").
 */
import fs from 'node:fs';
import path from 'node:path';
import { compileFlow, currentStep, replay, type FlowEvent } from '../machine';
import { checkFlowText } from '../parse';
import { exitsOf, type FlowDefinition, type Step } from '../schema';

export function loadShipped(id: string): FlowDefinition {
	const dir = process.env.SHIPPED_FLOWS_DIR ?? 'flows';
	const result = checkFlowText(fs.readFileSync(path.join(dir, `${id}.flow.yaml`), 'utf8'), { fileStem: id });
	if (!result.ok || !result.definition)
		throw new Error(`${id}: ${result.problems.map((p) => p.message).join('; ')}`);
	return result.definition;
}

/** Everything a checker or a technician reads on a step: title, body, and a verdict's repair and risks. */
export function stepText(step: Step): string {
	const v = step.kind === 'verdict' ? step.verdict : undefined;
	return [step.title, step.body ?? '', v?.repair ?? '', v?.risks ?? ''].join('\n');
}

/** A step's text with line breaks folded, so that a phrase wrapped in the file still matches. */
export const flat = (step: Step) => stepText(step).replace(/\s+/g, ' ');

/**
 * Answers (outcome labels) and readings (numbers) replayed through the compiled machine; returns
 * the step the run stands at. Throws when the flow refuses an event, naming it.
 */
export function walk(def: FlowDefinition, events: readonly (string | number)[]): string {
	const list: FlowEvent[] = events.map((e) =>
		typeof e === 'number' ? { type: 'MEASURE', value: e } : { type: 'ANSWER', outcome: e }
	);
	const { snapshot, refusedAt } = replay(compileFlow(def), list);
	if (refusedAt !== null) {
		const at = currentStep(snapshot, def)?.id;
		throw new Error(`refused "${events[refusedAt]}" at step "${at}"`);
	}
	return currentStep(snapshot, def)!.id;
}

/** Steps reachable from `from` without passing through any step in `avoid`. */
export function reachableAvoiding(
	def: FlowDefinition,
	from: string,
	avoid: readonly string[] = []
): Set<string> {
	const seen = new Set<string>();
	const stack = avoid.includes(from) ? [] : [from];
	while (stack.length) {
		const id = stack.pop()!;
		if (seen.has(id)) continue;
		seen.add(id);
		for (const next of exitsOf(def.steps[id])) if (!avoid.includes(next) && !seen.has(next)) stack.push(next);
	}
	return seen;
}

/** Ids of the verdict steps of a flow with their step. */
export const verdicts = (def: FlowDefinition) =>
	Object.entries(def.steps).flatMap(([id, s]) => (s.kind === 'verdict' ? [{ id, step: s }] : []));
