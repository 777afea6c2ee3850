/**
 * Flow health for seniors: the read side. Like the insights it answers from the process's copies
 * (the facts in insights/store.ts, the revisions in ./revisions.ts), brought up to date
 * incrementally before each read, so a senior reloading the page costs an index lookup or two and
 * arithmetic over arrays — never a scan of runs or run_steps on the request path.
 *
 *   import * as flowHealth from '$lib/server/flow-health/queries';
 *   flowHealth.forVersion(flowId, version)   the page's table
 *   flowHealth.standouts(limit)              the flagged steps of every flow's current version (Today)
 */
import { and, eq, inArray } from 'drizzle-orm';
import { getDb } from '$lib/server/db';
import { flows, flowVersions } from '$lib/server/db/schema/flows';
import { withStepOrder, type StoredVersion } from '$lib/server/flows/queries';
import { factStore } from '$lib/server/insights/store';
import { healthHref, type Standout, type VersionHealth } from '$lib/flow-health/types';
import { versionHealth } from './compute';
import { revisionStore } from './revisions';

async function ready() {
	const db = await getDb();
	const facts = factStore();
	// Facts first: a finished run's BACK rows were written before its facts, so reading revisions
	// second never misses one of a run whose facts are in.
	await facts.sync(db);
	const revisions = revisionStore();
	await revisions.sync(db, (runId) => facts.byRun.has(runId));
	return { db, facts, revisions };
}

// A numbered version's definition never changes: read each one once.
const definitions = new Map<string, StoredVersion>();
type Meta = { id: string; flowId: string; version: number | null; status: string };
async function withDefinitions(metas: Meta[]): Promise<StoredVersion[]> {
	const missing = metas.filter((m) => !definitions.has(m.id)).map((m) => m.id);
	if (missing.length > 0) {
		const db = await getDb();
		for (const row of await db.select().from(flowVersions).where(inArray(flowVersions.id, missing)))
			definitions.set(row.id, withStepOrder(row));
	}
	// Status can change (published → retired); the definition cannot.
	return metas.flatMap((m) => {
		const v = definitions.get(m.id);
		return v ? [{ ...v, status: m.status as StoredVersion['status'] }] : [];
	});
}

const meta = {
	id: flowVersions.id,
	flowId: flowVersions.flowId,
	version: flowVersions.version,
	status: flowVersions.status
};

const answers = new Map<string, { facts: number; revisions: number; value: unknown }>();
/** Forgets the read definitions and the computed answers (caches.ts). */
export function forgetFlowHealth() {
	definitions.clear();
	answers.clear();
}
function memo<T>(key: string, r: Awaited<ReturnType<typeof ready>>, compute: () => T): T {
	const hit = answers.get(key);
	if (hit && hit.facts === r.facts.generation && hit.revisions === r.revisions.generation)
		return hit.value as T;
	const value = compute();
	if (answers.size > 200) answers.clear();
	answers.set(key, { facts: r.facts.generation, revisions: r.revisions.generation, value });
	return value;
}

function healthOf(r: Awaited<ReturnType<typeof ready>>, v: StoredVersion, flowTitle: string) {
	return memo(`${v.flowId}@${v.version}:${v.status}:${flowTitle}`, r, () =>
		versionHealth(
			{
				flowId: v.flowId,
				flowTitle,
				version: v.version!,
				status: v.status === 'retired' ? 'retired' : 'published',
				definition: v.definition
			},
			r.facts.byFlow.get(v.flowId)?.values() ?? [],
			(runId) => r.revisions.byRun.get(runId)
		)
	);
}

/** The health of one numbered version, or undefined when the flow has no such version. */
export async function forVersion(flowId: string, version: number): Promise<VersionHealth | undefined> {
	const db = await getDb();
	const [r, metas, title] = await Promise.all([
		ready(),
		db
			.select(meta)
			.from(flowVersions)
			.where(and(eq(flowVersions.flowId, flowId), eq(flowVersions.version, version))),
		flowTitle(flowId)
	]);
	const [v] = await withDefinitions(metas);
	if (!v || (v.status !== 'published' && v.status !== 'retired')) return undefined;
	return healthOf(r, v, title ?? v.definition.title);
}

/** Finished runs per numbered version of a flow, for the version picker. */
export async function runsPerVersion(flowId: string): Promise<Map<number, number>> {
	const r = await ready();
	const counts = new Map<number, number>();
	for (const x of r.facts.byFlow.get(flowId)?.values() ?? [])
		counts.set(x.version, (counts.get(x.version) ?? 0) + 1);
	return counts;
}

async function flowTitle(flowId: string) {
	const db = await getDb();
	const [row] = await db.select({ title: flows.title }).from(flows).where(eq(flows.id, flowId));
	return row?.title;
}

/**
 * The steps that stand out on each flow's current version (the one new runs start on, which a
 * senior can still improve), most reasons first, then the busiest; at most `limit`.
 */
export async function standouts(limit = 5): Promise<Standout[]> {
	const db = await getDb();
	const [r, current] = await Promise.all([
		ready(),
		db
			.select({ ...meta, title: flows.title })
			.from(flowVersions)
			.innerJoin(flows, eq(flows.id, flowVersions.flowId))
			.where(eq(flowVersions.status, 'published'))
	]);
	const newest = new Map<string, (typeof current)[number]>();
	for (const c of current)
		if (c.version !== null && (newest.get(c.flowId)?.version ?? 0) < c.version) newest.set(c.flowId, c);
	const titles = new Map([...newest.values()].map((c) => [c.flowId, c.title]));
	const out: (Standout & { weight: number })[] = [];
	for (const v of await withDefinitions([...newest.values()])) {
		const h = healthOf(r, v, titles.get(v.flowId) ?? v.definition.title);
		for (const s of h.steps)
			if (s.flags.length > 0)
				out.push({
					flowId: h.flowId,
					flowTitle: h.flowTitle,
					version: h.version,
					stepId: s.stepId,
					stepTitle: s.title,
					kind: s.kind,
					reasons: s.flags.map((f) => f.reason),
					href: s.links.edit,
					healthHref: `${healthHref(h.flowId, h.version)}#step-${s.stepId}`,
					weight: s.flags.length * 1e9 + s.reached
				});
	}
	out.sort((a, b) => b.weight - a.weight || a.flowTitle.localeCompare(b.flowTitle));
	return out.slice(0, Math.max(0, limit)).map(({ weight: _, ...s }) => s);
}

/** Forgets the kept answers and definitions (tests that start over with another database). */
export function resetFlowHealth() {
	answers.clear();
	definitions.clear();
}
