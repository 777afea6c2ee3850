/**
 * The symptom catalogue: seeding, reading for intake and the library, and seniors' edits (each in
 * one transaction with its audit entry). Jobs store symptom codes; nothing here deletes a row.
 */
import { RuleError } from '$lib/server/errors';
import { and, asc, eq, sql } from 'drizzle-orm';
import { getDb, type Tx } from '$lib/server/db';
import { flows, flowVersions, jobs, symptoms } from '$lib/server/db/schema';
import { record } from '$lib/server/audit';
import { labelFromCode, type CatalogueSymptom } from '$lib/symptoms';
import type { SymptomAdd, SymptomEdit } from '$lib/schemas/symptom';
import { OTHER_GROUP, OTHER_SORT, flowFileTags, seedRows } from './seed';

const columns = {
	code: symptoms.code,
	label: symptoms.label,
	group: symptoms.group,
	sortOrder: symptoms.sortOrder,
	retired: symptoms.retired
};

/**
 * Adds the starting catalogue and every flow tag (files and stored flows) the table lacks; an
 * unknown tag goes to "Other" with a label made from its code. Rows already there are left as the
 * shop edited them, so it runs at every start. Returns the codes it added.
 */
export async function seedSymptoms(): Promise<string[]> {
	const db = await getDb();
	const stored = await db.select({ symptoms: flows.symptoms }).from(flows);
	const rows = seedRows();
	const known = new Set(rows.map((r) => r.code));
	const extra = [...new Set([...flowFileTags(), ...stored.flatMap((f) => f.symptoms)])]
		.filter((code) => !known.has(code) && /^[a-z0-9]+(-[a-z0-9]+)*$/.test(code))
		.sort();
	extra.forEach((code, i) =>
		rows.push({ code, label: labelFromCode(code), group: OTHER_GROUP, sortOrder: OTHER_SORT + i * 10 })
	);
	return db.transaction(async (tx) => {
		const added = await tx
			.insert(symptoms)
			.values(rows)
			.onConflictDoNothing()
			.returning({ code: symptoms.code });
		const codes = added.map((a) => a.code);
		if (codes.length)
			await record(tx, { actorId: null, action: 'symptom.seed', targetType: 'symptom', details: { codes } });
		return codes;
	});
}

let seeded: Promise<unknown> | undefined;
/** Readers call this so a database that missed the start-up task (tests, scripts) still has a catalogue. */
async function ensureSeeded() {
	seeded ??= seedSymptoms().catch((e) => {
		seeded = undefined;
		throw e;
	});
	await seeded;
}

/** The whole catalogue, retired rows included, in display order. */
export async function catalogue(): Promise<CatalogueSymptom[]> {
	await ensureSeeded();
	const db = await getDb();
	return db.select(columns).from(symptoms).orderBy(asc(symptoms.sortOrder), asc(symptoms.label));
}

/** What intake offers: the catalogue without retired symptoms. */
export async function offered(): Promise<CatalogueSymptom[]> {
	return (await catalogue()).filter((s) => !s.retired);
}

/** code → label for every symptom (retired too: old jobs still show theirs in words). */
export async function labels(): Promise<Map<string, string>> {
	return new Map((await catalogue()).map((s) => [s.code, s.label]));
}

export type SymptomUsage = CatalogueSymptom & { jobs: number; flows: string[] };

/** Each symptom with how many jobs came in with it and the published flows tagged with it. */
export async function usage(): Promise<SymptomUsage[]> {
	const list = await catalogue();
	const db = await getDb();
	const [jobCounts, flowTags] = await Promise.all([
		db
			.select({ code: sql<string>`s.code`, n: sql<number>`count(*)::int` })
			.from(sql`${jobs}, unnest(${jobs.symptoms}) as s(code)`)
			.groupBy(sql`s.code`),
		db
			.selectDistinct({ id: flows.id, title: flows.title, symptoms: flows.symptoms })
			.from(flows)
			.innerJoin(flowVersions, and(eq(flowVersions.flowId, flows.id), eq(flowVersions.status, 'published')))
	]);
	const counts = new Map(jobCounts.map((r) => [r.code, Number(r.n)]));
	return list.map((s) => ({
		...s,
		jobs: counts.get(s.code) ?? 0,
		flows: flowTags.filter((f) => f.symptoms.includes(s.code)).map((f) => f.title)
	}));
}

/**
 * Offered symptoms no published flow is tagged with, most jobs first: what the seniors should
 * write next.
 */
export async function withoutFlow(): Promise<SymptomUsage[]> {
	return (await usage())
		.filter((s) => !s.retired && s.flows.length === 0)
		.sort((a, b) => b.jobs - a.jobs || a.sortOrder - b.sortOrder);
}

async function nextSortOrder(tx: Tx, group: string) {
	const [inGroup] = await tx
		.select({ max: sql<number | null>`max(${symptoms.sortOrder})` })
		.from(symptoms)
		.where(eq(symptoms.group, group));
	if (inGroup.max !== null) return Number(inGroup.max) + 10;
	// A new group goes after the groups there are, but before "Other".
	const [all] = await tx
		.select({ max: sql<number | null>`max(${symptoms.sortOrder})` })
		.from(symptoms)
		.where(sql`${symptoms.sortOrder} < ${OTHER_SORT}`);
	return Math.floor(Number(all.max ?? 0) / 100) * 100 + 100;
}

export async function add(actorId: string, input: SymptomAdd): Promise<CatalogueSymptom> {
	await ensureSeeded();
	const db = await getDb();
	return db.transaction(async (tx) => {
		const sortOrder = await nextSortOrder(tx, input.group);
		const [row] = await tx
			.insert(symptoms)
			.values({ code: input.code, label: input.label, group: input.group, sortOrder })
			.onConflictDoNothing()
			.returning(columns);
		if (!row)
			throw new RuleError(
				409,
				'exists',
				`The catalogue already has a symptom with the code “${input.code}”.`,
				{ field: 'code' }
			);
		await record(tx, {
			actorId,
			action: 'symptom.add',
			targetType: 'symptom',
			targetId: row.code,
			details: { label: row.label, group: row.group }
		});
		return row;
	});
}

/** Rename, regroup (to the end of the new group), retire or bring back. Unchanged input writes nothing. */
export async function update(
	actorId: string,
	code: string,
	input: Omit<SymptomEdit, 'code'>
): Promise<CatalogueSymptom> {
	await ensureSeeded();
	const db = await getDb();
	return db.transaction(async (tx) => {
		const [before] = await tx.select(columns).from(symptoms).where(eq(symptoms.code, code)).for('update');
		if (!before) throw new RuleError(404, 'not-found', `No symptom with the code “${code}”.`);
		const changes: Partial<CatalogueSymptom> = {};
		if (input.label !== before.label) changes.label = input.label;
		if (input.group !== before.group) {
			changes.group = input.group;
			changes.sortOrder = await nextSortOrder(tx, input.group);
		}
		if (input.retired !== before.retired) changes.retired = input.retired;
		if (Object.keys(changes).length === 0) return before;
		const [after] = await tx
			.update(symptoms)
			.set({ ...changes, updatedAt: new Date() })
			.where(eq(symptoms.code, code))
			.returning(columns);
		const action =
			changes.retired === true
				? 'symptom.retire'
				: changes.retired === false
					? 'symptom.restore'
					: 'symptom.update';
		const from = Object.fromEntries(
			Object.keys(changes).map((k) => [k, before[k as keyof CatalogueSymptom]])
		);
		await record(tx, {
			actorId,
			action,
			targetType: 'symptom',
			targetId: code,
			details: { from, to: changes }
		});
		return after;
	});
}
