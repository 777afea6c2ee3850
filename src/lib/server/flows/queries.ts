// Over 300 lines on purpose: every read of the flow library (import, list, versions, suggestions, reviews).
import fs from 'node:fs';
import path from 'node:path';
import { and, asc, desc, eq, inArray, isNotNull, notExists, sql } from 'drizzle-orm';
import { getDb, type DB, type Tx } from '$lib/server/db';
import {
	auditLog,
	flows,
	flowVersions,
	runs,
	users,
	type FlowStatus,
	type FlowVersion
} from '$lib/server/db/schema';
import { record } from '$lib/server/audit';
import { checkFlowText } from '$lib/flows/parse';
import { formatPath, type FlowProblem } from '$lib/flows/check';
import type { FlowDefinition } from '$lib/flows/schema';
import { hasRole, type Role } from '$lib/roles';
import { checksumOf } from './checksum';
import { env } from '$lib/server/env';

const SUFFIX = '.flow.yaml';

/** Where the shipped flows live. Resolved from the working directory, as `node build` runs from the repo root. */
export function flowsDir() {
	return path.resolve(env().FLOWS_DIR);
}

/** A stored version with its definition's steps back in authored order. */
export type StoredVersion = Omit<FlowVersion, 'definition'> & { definition: FlowDefinition };

/** jsonb sorts object keys its own way; put the steps back in the order the author wrote them. */
export function withStepOrder(row: FlowVersion): StoredVersion {
	const def = row.definition;
	const steps: FlowDefinition['steps'] = {};
	for (const id of row.stepOrder) if (Object.hasOwn(def.steps, id)) steps[id] = def.steps[id];
	for (const id of Object.keys(def.steps)) if (!Object.hasOwn(steps, id)) steps[id] = def.steps[id];
	return { ...row, definition: { ...def, steps } };
}

/** Columns to store for a definition: the definition itself, its step order and its checksum. */
export function definitionColumns(definition: FlowDefinition) {
	return { definition, stepOrder: Object.keys(definition.steps), checksum: checksumOf(definition) };
}

// ---------------------------------------------------------------------------------------------
// Import of flows/*.flow.yaml at start-up

export type ImportReport = {
	imported: { flowId: string; version: number; file: string }[];
	unchanged: string[];
	refused: { file: string; problems: FlowProblem[] }[];
	/** Set when the folder itself could not be read. */
	error?: string;
};

const g = globalThis as unknown as { __tidemarkFlowImport?: ImportReport };

/** What the last import at start-up found; the library shows refused files to seniors. */
export function lastImport(): ImportReport | undefined {
	return g.__tidemarkFlowImport;
}

export function formatProblem(file: string, p: FlowProblem) {
	const where = p.step ?? (p.path ? formatPath(p.path) : '(top level)');
	return `${file}: ${where}: ${p.code}: ${p.message}`;
}

/**
 * Every `*.flow.yaml` in `dir` whose checksum is not yet stored as a version of its flow becomes
 * the next published version. A file that fails the check is refused and its problems logged; the
 * other files still import. Safe to run at every start: an unchanged file adds nothing.
 */
export async function importFromFiles(dir = flowsDir()): Promise<ImportReport> {
	const report: ImportReport = { imported: [], unchanged: [], refused: [] };
	g.__tidemarkFlowImport = report;
	let names: string[];
	try {
		names = fs
			.readdirSync(dir)
			.filter((n) => n.endsWith(SUFFIX))
			.sort();
	} catch (e) {
		report.error = `cannot read the flows folder ${dir}: ${e instanceof Error ? e.message : String(e)}`;
		console.error(`[flows] ${report.error}`);
		return report;
	}

	const db = await getDb();
	for (const name of names) {
		const result = checkFlowText(fs.readFileSync(path.join(dir, name), 'utf8'), {
			fileStem: name.slice(0, -SUFFIX.length)
		});
		if (!result.ok || !result.definition) {
			report.refused.push({ file: name, problems: result.problems });
			console.error(`[flows] refused ${name}, which fails the check:`);
			for (const p of result.problems) console.error(`  ${formatProblem(name, p)}`);
			continue;
		}
		const version = await db.transaction((tx) => importOne(tx, result.definition!, name));
		if (version === null) report.unchanged.push(name);
		else report.imported.push({ flowId: result.definition.id, version, file: name });
	}
	const { imported, unchanged, refused } = report;
	console.log(
		`[flows] ${imported.length} imported, ${unchanged.length} unchanged, ${refused.length} refused`
	);
	return report;
}

/** The new version number, or null when this definition is already stored. */
async function importOne(tx: Tx, definition: FlowDefinition, file: string): Promise<number | null> {
	const cols = definitionColumns(definition);
	await tx
		.insert(flows)
		.values({ id: definition.id, title: definition.title, symptoms: definition.symptoms })
		.onConflictDoNothing();
	// Lock the flow so two importers cannot both take the same next number.
	await tx.select({ id: flows.id }).from(flows).where(eq(flows.id, definition.id)).for('update');
	const [stored] = await tx
		.select({ id: flowVersions.id })
		.from(flowVersions)
		.where(
			and(
				eq(flowVersions.flowId, definition.id),
				eq(flowVersions.checksum, cols.checksum),
				isNotNull(flowVersions.version)
			)
		);
	if (stored) return null;
	const version = (await highestVersion(tx, definition.id)) + 1;
	const now = new Date();
	const [row] = await tx
		.insert(flowVersions)
		.values({
			flowId: definition.id,
			version,
			status: 'published',
			...cols,
			publishedAt: now,
			changelog: definition.changelog?.trim() || `Imported from flows/${file}`
		})
		.returning({ id: flowVersions.id });
	await tx
		.update(flows)
		.set({ title: definition.title, symptoms: definition.symptoms })
		.where(eq(flows.id, definition.id));
	await record(tx, {
		actorId: null,
		action: 'flow.import',
		targetType: 'flow',
		targetId: definition.id,
		details: { version, file, checksum: cols.checksum, versionId: row.id }
	});
	return version;
}

export async function highestVersion(tx: DB | Tx, flowId: string): Promise<number> {
	const [{ n }] = await tx
		.select({ n: sql<number>`coalesce(max(${flowVersions.version}), 0)::int` })
		.from(flowVersions)
		.where(eq(flowVersions.flowId, flowId));
	return n;
}

// ---------------------------------------------------------------------------------------------
// Reading

export type LibraryEntry = {
	id: string;
	title: string;
	symptoms: string[];
	/** Newest published version, or null when none is published (seniors still see the flow). */
	current: number | null;
	/** Drafts and drafts in review; null for technicians, who do not see drafts. */
	openDrafts: number | null;
	runs: number;
};

/** How many runs (of any status, on any version) each flow has had; 0 for a flow never run. */
export async function runsByFlow(flowIds: string[]): Promise<Map<string, number>> {
	const counts = new Map(flowIds.map((id) => [id, 0]));
	if (flowIds.length === 0) return counts;
	const db = await getDb();
	const rows = await db
		.select({ flowId: flowVersions.flowId, n: sql<number>`count(*)::int` })
		.from(runs)
		.innerJoin(flowVersions, eq(flowVersions.id, runs.flowVersionId))
		.where(inArray(flowVersions.flowId, flowIds))
		.groupBy(flowVersions.flowId);
	for (const r of rows) counts.set(r.flowId, Number(r.n));
	return counts;
}

export async function listLibrary(role: Role): Promise<LibraryEntry[]> {
	const db = await getDb();
	const rows = await db
		.select({
			id: flows.id,
			title: flows.title,
			symptoms: flows.symptoms,
			current: sql<
				number | null
			>`max(${flowVersions.version}) filter (where ${flowVersions.status} = 'published')`,
			openDrafts: sql<number>`(count(${flowVersions.id}) filter (where ${flowVersions.status} in ('draft', 'in-review')))::int`
		})
		.from(flows)
		.leftJoin(flowVersions, eq(flowVersions.flowId, flows.id))
		.groupBy(flows.id)
		.orderBy(asc(flows.title));
	const seesDrafts = hasRole(role, 'senior');
	const visible = seesDrafts ? rows : rows.filter((r) => r.current !== null);
	const runs = await runsByFlow(visible.map((r) => r.id));
	return visible.map((r) => ({
		...r,
		current: r.current === null ? null : Number(r.current),
		openDrafts: seesDrafts ? r.openDrafts : null,
		runs: runs.get(r.id) ?? 0
	}));
}

export async function getFlow(flowId: string) {
	const db = await getDb();
	const [flow] = await db.select().from(flows).where(eq(flows.id, flowId));
	return flow;
}

/** A numbered (published or retired) version of a flow. */
export async function getVersion(flowId: string, version: number): Promise<StoredVersion | undefined> {
	const db = await getDb();
	const [row] = await db
		.select()
		.from(flowVersions)
		.where(and(eq(flowVersions.flowId, flowId), eq(flowVersions.version, version)));
	return row && withStepOrder(row);
}

export async function getVersionById(id: string): Promise<StoredVersion | undefined> {
	const db = await getDb();
	const [row] = await db.select().from(flowVersions).where(eq(flowVersions.id, id));
	return row && withStepOrder(row);
}

export type VersionSummary = {
	id: string;
	version: number | null;
	status: FlowStatus;
	checksum: string;
	changelog: string | null;
	authorName: string | null;
	publishedAt: Date | null;
	retiredAt: Date | null;
	updatedAt: Date;
};

const summaryColumns = {
	id: flowVersions.id,
	version: flowVersions.version,
	status: flowVersions.status,
	checksum: flowVersions.checksum,
	changelog: flowVersions.changelog,
	authorName: users.name,
	publishedAt: flowVersions.publishedAt,
	retiredAt: flowVersions.retiredAt,
	updatedAt: flowVersions.updatedAt
};

/** Every version that was ever published (retired ones too), newest first. */
export async function publishedVersions(flowId: string): Promise<VersionSummary[]> {
	return summaries(flowId, ['published', 'retired']);
}

/** Drafts and drafts in review of a flow, newest first; for seniors and leads. */
export async function openDrafts(flowId: string): Promise<VersionSummary[]> {
	return summaries(flowId, ['draft', 'in-review']);
}

async function summaries(flowId: string, statuses: FlowStatus[]) {
	const db = await getDb();
	return db
		.select(summaryColumns)
		.from(flowVersions)
		.leftJoin(users, eq(users.id, flowVersions.authorId))
		.where(and(eq(flowVersions.flowId, flowId), inArray(flowVersions.status, statuses)))
		.orderBy(sql`${flowVersions.version} desc nulls first`, desc(flowVersions.updatedAt));
}

/** The newest published version: the one new runs start on. */
export async function currentPublished(flowId: string): Promise<StoredVersion | undefined> {
	const db = await getDb();
	const [row] = await db
		.select()
		.from(flowVersions)
		.where(and(eq(flowVersions.flowId, flowId), eq(flowVersions.status, 'published')))
		.orderBy(desc(flowVersions.version))
		.limit(1);
	return row && withStepOrder(row);
}

export type Suggestion = {
	id: string;
	title: string;
	symptoms: string[];
	version: number;
	matched: string[];
	/** Runs of every version of the flow: the shop's experience with it. */
	runs: number;
};

/**
 * Published flows sharing a symptom tag with `tags`, best match first: most shared tags, then the
 * flow the shop has run most, then by title. For starting a run on a job.
 */
export async function suggestBySymptoms(tags: string[]): Promise<Suggestion[]> {
	const wanted = [...new Set(tags.map((t) => t.trim().toLowerCase()).filter(Boolean))];
	if (wanted.length === 0) return [];
	const db = await getDb();
	const rows = await db
		.select({
			id: flows.id,
			title: flows.title,
			symptoms: flows.symptoms,
			version: sql<number>`max(${flowVersions.version})::int`
		})
		.from(flows)
		.innerJoin(flowVersions, and(eq(flowVersions.flowId, flows.id), eq(flowVersions.status, 'published')))
		.where(sql`${flows.symptoms} && ${sql.param(wanted)}::text[]`)
		.groupBy(flows.id);
	const counts = await runsByFlow(rows.map((r) => r.id));
	return rows
		.map((r) => ({
			...r,
			matched: r.symptoms.filter((s) => wanted.includes(s)),
			runs: counts.get(r.id) ?? 0
		}))
		.sort((a, b) => b.matched.length - a.matched.length || b.runs - a.runs || a.title.localeCompare(b.title));
}

export type AwaitingReview = {
	id: string;
	flowId: string;
	title: string;
	authorName: string | null;
	submittedAt: Date | null;
};

/**
 * Drafts submitted for review, oldest first (the longest waiting at the top); for seniors. With
 * `reviewerId`, only those that member may review: not written or edited by them (the four-eyes
 * rule; Today and the navigation's count).
 */
export async function awaitingReview(reviewerId?: string, limit?: number): Promise<AwaitingReview[]> {
	const db = await getDb();
	const fourEyes = reviewerId
		? and(
				sql`${flowVersions.authorId} is distinct from ${reviewerId}`,
				notExists(
					db
						.select({ one: sql`1` })
						.from(auditLog)
						.where(
							and(
								eq(auditLog.action, 'flow.draft.save'),
								eq(auditLog.actorId, reviewerId),
								sql`${auditLog.details}->>'draftId' = ${flowVersions.id}::text`
							)
						)
				)
			)
		: undefined;
	const query = db
		.select({
			id: flowVersions.id,
			flowId: flowVersions.flowId,
			title: sql<string>`${flowVersions.definition}->>'title'`,
			authorName: users.name,
			submittedAt: flowVersions.submittedAt
		})
		.from(flowVersions)
		.leftJoin(users, eq(users.id, flowVersions.authorId))
		.where(and(eq(flowVersions.status, 'in-review'), fourEyes))
		.orderBy(asc(flowVersions.submittedAt));
	return limit ? query.limit(limit) : query;
}
