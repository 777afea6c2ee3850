/**
 * Test support for the content specs of the shipped flows: load a flow file, walk its graph and
 * its compiled machine, and read its text the way FLOW-RULES reads it (title + body + verdict
 * repair + risks). `SHIPPED_FLOWS_DIR` points the specs at another folder, so that each spec can be
 * shown to fail on an earlier version of the files (e.g. `git show main:flows/<file>` copied out).
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { compileFlow, replay, type FlowEvent } from '../machine';
import { parseFlow } from '../parse';
import type { FlowDefinition, Step } from '../schema';

export function shippedFlow(id: string): FlowDefinition {
	const dir = process.env.SHIPPED_FLOWS_DIR ?? path.resolve('flows');
	const parsed = parseFlow(readFileSync(path.join(dir, `${id}.flow.yaml`), 'utf8'));
	if (!parsed.ok) throw new Error(`${id}: ${parsed.problems.map((p) => p.message).join('; ')}`);
	return parsed.definition;
}

/** The words a technician reads on the step, lower-cased, with line breaks read as spaces. */
export function stepText(step: Step): string {
	const parts = [step.title, step.body];
	if (step.kind === 'verdict') parts.push(step.verdict.repair, step.verdict.risks);
	return parts.filter(Boolean).join(' ').replace(/\s+/g, ' ').toLowerCase();
}

export function exitTargets(step: Step): string[] {
	if (step.kind === 'measure') return (step.ranges ?? []).map((r) => r.next);
	if (step.kind === 'verdict') return [];
	return (step.outcomes ?? []).map((o) => o.next);
}

/**
 * Steps reachable from `from` (included). A step for which `stop` is true is included but not
 * walked through: "what can the technician meet before reaching such a step".
 */
export function reachable(def: FlowDefinition, from: string, stop: (id: string) => boolean = () => false) {
	const seen = new Set<string>([from]);
	const queue = [from];
	while (queue.length) {
		const id = queue.shift()!;
		if (id !== from && stop(id)) continue;
		for (const next of exitTargets(def.steps[id]))
			if (!seen.has(next)) {
				seen.add(next);
				queue.push(next);
			}
	}
	return seen;
}

/** A reading that falls in the range (its lower bound, else just below its upper bound). */
function readingIn(r: { min?: number; max?: number }): number {
	if (r.min !== undefined) return r.min;
	return r.max !== undefined ? r.max - 0.001 : 0;
}

/** The shortest run of events from the start step to `target`, or undefined if none. */
export function eventsTo(def: FlowDefinition, target: string): FlowEvent[] | undefined {
	const via = new Map<string, { from: string; event: FlowEvent }>();
	const queue = [def.start];
	const seen = new Set([def.start]);
	while (queue.length) {
		const id = queue.shift()!;
		if (id === target) {
			const events: FlowEvent[] = [];
			for (let at = id; at !== def.start; at = via.get(at)!.from) events.unshift(via.get(at)!.event);
			return events;
		}
		const step = def.steps[id];
		const exits: [string, FlowEvent][] =
			step.kind === 'measure'
				? (step.ranges ?? []).map((r) => [r.next, { type: 'MEASURE', value: readingIn(r) }])
				: step.kind === 'verdict'
					? []
					: (step.outcomes ?? []).map((o, i) => [o.next, { type: 'ANSWER', outcome: i }]);
		for (const [next, event] of exits)
			if (!seen.has(next)) {
				seen.add(next);
				via.set(next, { from: id, event });
				queue.push(next);
			}
	}
	return undefined;
}

/** Replays events on the compiled machine; the step it stands on and the recorded path. */
export function walk(def: FlowDefinition, events: readonly FlowEvent[]) {
	const { snapshot, refusedAt } = replay(compileFlow(def), events);
	return {
		step: String(snapshot.value),
		refusedAt,
		path: snapshot.context.path,
		verdict: snapshot.status === 'done' ? snapshot.output?.verdict : undefined
	};
}

/** Walks to `target` by the shortest route, then applies `more`. */
export function walkVia(def: FlowDefinition, target: string, more: FlowEvent[] = []) {
	const events = eventsTo(def, target);
	if (!events) throw new Error(`${def.id}: no route from the start to "${target}"`);
	return walk(def, [...events, ...more]);
}
