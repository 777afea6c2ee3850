/**
 * The editor's working state: the draft definition, the selected step and the live check, which
 * runs a short moment after the last change so that typing stays smooth.
 */
import { checkFlow, type CheckResult, type FlowProblem } from '$lib/flows/check';
import type { EditResult } from '$lib/flows/edit';
import type { FlowDefinition } from '$lib/flows/schema';

export const CHECK_DELAY_MS = 150;

export class FlowEditorState {
	definition = $state.raw() as FlowDefinition;
	selected = $state<string | null>(null);
	check = $state.raw() as CheckResult;
	/** Bumped on every change, so autosave can tell whether anything is unsaved. */
	changes = $state(0);
	#timer: ReturnType<typeof setTimeout> | undefined;
	#delay: number;

	/** `select` opens the editor at that step (e.g. from flow health's link); else at the start. */
	constructor(definition: FlowDefinition, options: { delay?: number; select?: string | null } = {}) {
		this.definition = definition;
		this.#delay = options.delay ?? CHECK_DELAY_MS;
		this.check = checkFlow(definition);
		this.selected =
			options.select && Object.hasOwn(definition.steps, options.select)
				? options.select
				: definition.start in definition.steps
					? definition.start
					: (Object.keys(definition.steps)[0] ?? null);
	}

	/** Replaces the draft (from the form, the YAML view or a reload) and schedules the check. */
	set(definition: FlowDefinition, select?: string | null) {
		this.definition = definition;
		if (select !== undefined) this.selected = select;
		this.changes++;
		clearTimeout(this.#timer);
		this.#timer = setTimeout(() => this.checkNow(), this.#delay);
	}

	/** Applies an edit operation; returns the refusal message, or null when it was applied. */
	apply(result: EditResult): string | null {
		if (!result.ok) return result.message;
		this.set(result.definition, result.id);
		return null;
	}

	checkNow() {
		clearTimeout(this.#timer);
		this.check = checkFlow(this.definition);
	}

	problemsOf(stepId: string): FlowProblem[] {
		return this.check.problems.filter((p) => p.step === stepId);
	}

	destroy() {
		clearTimeout(this.#timer);
	}
}
