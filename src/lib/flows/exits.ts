import type { Step } from './schema';

/** The steps a given step can lead to, in authored order (duplicates kept). */
export function exitsOf(step: Step): string[] {
	if (step.kind === 'verdict') return [];
	if (step.kind === 'measure') return (step.ranges ?? []).map((r) => r.next);
	return (step.outcomes ?? []).map((o) => o.next);
}
