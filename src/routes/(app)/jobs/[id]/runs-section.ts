import * as flowLibrary from '$lib/server/flows/queries';
import type { RunSummary } from '$lib/runs/types';
import * as catalogue from '$lib/server/symptoms/queries';
import * as runs from '$lib/server/runs/queries';

/** `matched`: the job's symptoms the flow is tagged with, in the catalogue's words. */
export type FlowChoice = { id: string; title: string; version: number; matched: string[]; runs: number };
export type JobRunsSection = { runs: RunSummary[]; suggested: FlowChoice[]; others: FlowChoice[] };

/**
 * What the job page's "Runs" section needs: the job's runs, the published flows whose symptom tags
 * match the job's (best match first, `suggestBySymptoms`), and the other published flows (a phone does not always match its intake).
 */
export async function jobRunsSection(job: { id: string; symptoms: string[] }): Promise<JobRunsSection> {
	const [list, matches, library, labels] = await Promise.all([
		runs.listForJob(job.id),
		flowLibrary.suggestBySymptoms(job.symptoms),
		flowLibrary.listLibrary('technician'),
		catalogue.labels()
	]);
	const suggested = matches.map((m) => ({
		id: m.id,
		title: m.title,
		version: m.version,
		matched: m.matched.map((code) => labels.get(code) ?? code),
		runs: m.runs
	}));
	const taken = new Set(suggested.map((s) => s.id));
	const others = library
		.filter((f) => f.current !== null && !taken.has(f.id))
		.map((f) => ({ id: f.id, title: f.title, version: f.current as number, matched: [], runs: f.runs }));
	return { runs: list, suggested, others };
}
