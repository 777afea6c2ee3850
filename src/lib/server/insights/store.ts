/**
 * The insights' working copy of `insight_run_facts`, held in this process and brought up to date
 * incrementally before every read: one indexed `max(seq)` query, then only the rows written since.
 *
 * Why in memory: PGlite executes every statement synchronously on Node's main thread. Measured at
 * 100,000 facts, a bare `count(*)` takes ~45 ms and a grouped aggregate 120–350 ms, each stalling
 * every technician's request meanwhile. The same aggregates over plain arrays take a few ms. The
 * table stays the durable source (written on completion, rebuildable); this copy is a cache.
 */
import { gt, asc, sql } from 'drizzle-orm';
import type { DB } from '$lib/server/db';
import { insightRunFacts } from '$lib/server/db/schema/insights';
import { flows, flowVersions } from '$lib/server/db/schema/flows';
import { users } from '$lib/server/db/schema/users';
import type { FlowDefinition } from '$lib/flows/schema';

export type Fact = {
	runId: string;
	seq: number;
	jobId: string;
	flowId: string;
	version: number;
	status: 'completed' | 'abandoned';
	verdictCode: string | null;
	deviceModel: string;
	technicianId: string;
	startedAt: number;
	finishedAt: number;
	durationS: number;
	stepIds: string[];
	outcomes: number[];
	dwellS: number[];
	abandonReason: string | null;
	abandonStep: string | null;
	confirmed: boolean | null;
	confirmationNote: string | null;
	confirmedAt: number | null;
};

/** Rows fetched per query while catching up; each batch is a short statement (see the bench). */
const BATCH = 250;

// Step ids and models repeat across thousands of rows: keep one copy of each string.
const interned = new Map<string, string>();
const intern = (s: string) => {
	const hit = interned.get(s);
	if (hit !== undefined) return hit;
	interned.set(s, s);
	return s;
};

export class FactStore {
	readonly byRun = new Map<string, Fact>();
	/** Facts per flow, for the run screen's per-step history. */
	readonly byFlow = new Map<string, Map<string, Fact>>();
	lastSeq = 0;
	/** Bumped whenever a fact arrives, so derived caches know to recompute. */
	generation = 0;
	private syncing: Promise<void> | null = null;

	add(f: Fact) {
		this.byRun.set(f.runId, f);
		let flow = this.byFlow.get(f.flowId);
		if (!flow) this.byFlow.set(f.flowId, (flow = new Map()));
		flow.set(f.runId, f);
		if (f.seq > this.lastSeq) this.lastSeq = f.seq;
		this.generation++;
	}

	facts(): Iterable<Fact> {
		return this.byRun.values();
	}

	/** Catches up with the table; concurrent callers share one catch-up. */
	sync(db: DB): Promise<void> {
		this.syncing ??= this.catchUp(db).finally(() => (this.syncing = null));
		return this.syncing;
	}

	private async catchUp(db: DB) {
		const [{ max }] = await db
			.select({ max: sql<string | null>`max(${insightRunFacts.seq})` })
			.from(insightRunFacts);
		if (max === null || Number(max) <= this.lastSeq) return;
		for (;;) {
			const rows = await db
				.select()
				.from(insightRunFacts)
				.where(gt(insightRunFacts.seq, this.lastSeq))
				.orderBy(asc(insightRunFacts.seq))
				.limit(BATCH);
			for (const r of rows)
				this.add({
					runId: r.runId,
					seq: r.seq,
					jobId: r.jobId,
					flowId: intern(r.flowId),
					version: r.version,
					status: r.status,
					verdictCode: r.verdictCode === null ? null : intern(r.verdictCode),
					deviceModel: intern(r.deviceModel),
					technicianId: intern(r.technicianId),
					startedAt: r.startedAt.getTime(),
					finishedAt: r.finishedAt.getTime(),
					durationS: r.durationS,
					stepIds: r.stepIds.map(intern),
					outcomes: r.outcomes,
					dwellS: r.dwellS,
					abandonReason: r.abandonReason,
					abandonStep: r.abandonStep,
					confirmed: r.confirmed,
					confirmationNote: r.confirmationNote,
					confirmedAt: r.confirmedAt?.getTime() ?? null
				});
			if (rows.length < BATCH) return;
			// Let waiting requests (a technician's step) run between batches.
			await new Promise((resolve) => setImmediate(resolve));
		}
	}
}

/** Names for ids: flow and step titles from the stored versions, staff names. */
export type Labels = {
	flowTitle: (flowId: string) => string;
	stepTitle: (flowId: string, stepId: string) => string;
	verdictTitle: (flowId: string, code: string) => string;
	technicianName: (id: string) => string;
	/** The newest published definition of a flow, for step kinds, exits and minutes. */
	definition: (flowId: string) => FlowDefinition | undefined;
	technicians: { id: string; name: string }[];
};

async function loadLabels(db: DB): Promise<Labels> {
	const flowRows = await db.select({ id: flows.id, title: flows.title }).from(flows);
	// Oldest first, so a newer version's titles win; drafts are left out.
	const versions = await db
		.select({ flowId: flowVersions.flowId, definition: flowVersions.definition })
		.from(flowVersions)
		.where(sql`${flowVersions.version} is not null`)
		.orderBy(asc(flowVersions.flowId), asc(flowVersions.version));
	const people = await db.select({ id: users.id, name: users.name }).from(users);
	const flowTitles = new Map(flowRows.map((f) => [f.id, f.title]));
	const stepTitles = new Map<string, string>();
	const verdictTitles = new Map<string, string>();
	const newest = new Map<string, FlowDefinition>();
	for (const v of versions) {
		newest.set(v.flowId, v.definition);
		for (const [id, step] of Object.entries(v.definition.steps)) {
			stepTitles.set(`${v.flowId}\u0000${id}`, step.title);
			if (step.kind === 'verdict') verdictTitles.set(`${v.flowId}\u0000${step.verdict.code}`, step.title);
		}
	}
	const names = new Map(people.map((p) => [p.id, p.name]));
	// Same content, same object: the answers cached in queries.ts stay valid across reloads.
	const signature = JSON.stringify([flowRows, versions.length, people]);
	if (g.__tidemarkLabelsLast?.signature === signature) return g.__tidemarkLabelsLast.labels;
	const fresh: Labels = {
		flowTitle: (id) => flowTitles.get(id) ?? id,
		stepTitle: (flowId, stepId) => stepTitles.get(`${flowId}\u0000${stepId}`) ?? stepId,
		verdictTitle: (flowId, code) => verdictTitles.get(`${flowId}\u0000${code}`) ?? code,
		technicianName: (id) => names.get(id) ?? 'Former staff member',
		definition: (flowId) => newest.get(flowId),
		technicians: people.sort((a, b) => a.name.localeCompare(b.name))
	};
	g.__tidemarkLabelsLast = { signature, labels: fresh };
	return fresh;
}

// One store per process, on globalThis so that Vite's HMR does not load it twice.
const g = globalThis as unknown as {
	__tidemarkFacts?: FactStore;
	__tidemarkLabels?: { at: number; labels: Promise<Labels> };
	__tidemarkLabelsLast?: { signature: string; labels: Labels };
};

export function factStore(): FactStore {
	g.__tidemarkFacts ??= new FactStore();
	return g.__tidemarkFacts;
}

/** Labels change only when flows are published or staff added; ten seconds of staleness is fine. */
export function labels(db: DB): Promise<Labels> {
	const hit = g.__tidemarkLabels;
	if (hit && Date.now() - hit.at < 10_000) return hit.labels;
	const fresh = loadLabels(db);
	g.__tidemarkLabels = { at: Date.now(), labels: fresh };
	fresh.catch(() => (g.__tidemarkLabels = undefined));
	return fresh;
}

/** Forgets the process's copy (tests that start over with another database). */
export function resetStore() {
	g.__tidemarkFacts = undefined;
	g.__tidemarkLabels = undefined;
	g.__tidemarkLabelsLast = undefined;
}
