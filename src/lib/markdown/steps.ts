/**
 * Every markdown text of a flow version, rendered and sanitised once in the run page's load, so the
 * run screen shows any step at once (the machine moves on the client) without shipping marked and
 * DOMPurify to the tablet.
 */
import type { FlowDefinition } from '$lib/flows/schema';
import { renderMarkdown } from './render';

export type StepHtml = { body?: string; repair?: string; risks?: string };

export function renderStepsHtml(definition: FlowDefinition): Record<string, StepHtml> {
	const out: Record<string, StepHtml> = {};
	for (const [id, step] of Object.entries(definition.steps)) {
		const html: StepHtml = {};
		if (step.body) html.body = renderMarkdown(step.body);
		if (step.kind === 'verdict') {
			html.repair = renderMarkdown(step.verdict.repair);
			html.risks = renderMarkdown(step.verdict.risks);
		}
		out[id] = html;
	}
	return out;
}

// A published flow version never changes (runs pin it), so its HTML is made once per process.
const byVersion = new Map<string, Record<string, StepHtml>>();
const KEPT_VERSIONS = 100;

/** renderStepsHtml for a pinned flow version, remembered by the version's id. */
export function stepsHtmlForVersion(versionId: string, definition: FlowDefinition) {
	let html = byVersion.get(versionId);
	if (!html) {
		html = renderStepsHtml(definition);
		if (byVersion.size >= KEPT_VERSIONS) byVersion.delete(byVersion.keys().next().value!);
		byVersion.set(versionId, html);
	}
	return html;
}
