// Over 300 lines on purpose: one state machine, a flow version's life from draft to retired.
/**
 * The life of a flow version: draft → in review → published (N+1, immutable) → retired.
 * Seniors and leads author; another senior or a lead reviews (four eyes). Every change is audited
 * in the same transaction. A refusal is a RuleError (`refuse` below gives each code its status):
 * not-found 404, forbidden 403, conflict 409, state 409, invalid 400.
 */
import { and, desc, eq, isNotNull, sql } from 'drizzle-orm';
import { getDb, type Tx } from '$lib/server/db';
import { auditLog, flows, flowVersions } from '$lib/server/db/schema';
import { record } from '$lib/server/audit';
import { checkFlow, type FlowProblem } from '$lib/flows/check';
import { parseFlow, withLines } from '$lib/flows/parse';
import { schemaProblems } from '$lib/flows/problems';
import { flowSchema, RESERVED_FLOW_IDS, type FlowDefinition } from '$lib/flows/schema';
import { hasRole, type Role } from '$lib/roles';
import { definitionColumns, highestVersion, withStepOrder, type StoredVersion } from './queries';
import { draftJson, type DraftJson } from './draft-json';
import { RuleError } from '$lib/server/errors';

export type Actor = { id: string; role: Role };
export type AuthoringErrorCode = 'not-found' | 'forbidden' | 'conflict' | 'state' | 'invalid';

const statusOf = { 'not-found': 404, forbidden: 403, conflict: 409, state: 409, invalid: 400 } as const;

/**
 * A refusal of the lifecycle. `problems` are the flow's problems (an import or review the check
 * refuses); on a save conflict `current` is the draft as it is now, so the editor can offer a
 * clear choice.
 */
function refuse(
	code: AuthoringErrorCode,
	message: string,
	problems: FlowProblem[] = [],
	current?: StoredVersion
) {
	return new RuleError(statusOf[code], code, message, {
		...(problems.length ? { problems } : {}),
		...(current ? { current: draftJson(current) } : {})
	});
}

/** The flow problems a refusal carries (none for most). */
export const problemsOf = (e: unknown): FlowProblem[] =>
	e instanceof RuleError ? ((e.details.problems as FlowProblem[] | undefined) ?? []) : [];
/** On a save conflict: the draft as it is now. */
export const currentOf = (e: unknown): DraftJson | undefined =>
	e instanceof RuleError && e.code === 'conflict' ? (e.details.current as DraftJson | undefined) : undefined;

function assertUsableId(id: string, nothing: string) {
	if (RESERVED_FLOW_IDS.includes(id))
		throw refuse('invalid', `The flow id "${id}" is taken by the library's own pages; ${nothing}`, [
			{ code: 'schema', path: ['id'], message: `Choose another id than "${id}".` }
		]);
}

function assertSenior(actor: Actor) {
	if (!hasRole(actor.role, 'senior'))
		throw refuse('forbidden', 'Only senior technicians and leads author and review flows.');
}

/** Shape check only: a draft may still have graph problems, but it must be a flow. */
function validShape(input: unknown): FlowDefinition {
	const parsed = flowSchema.safeParse(input);
	if (!parsed.success)
		throw refuse(
			'invalid',
			'The draft is not a flow yet; fix the fields marked.',
			schemaProblems(parsed.error)
		);
	return parsed.data;
}

async function lockVersion(tx: Tx, id: string): Promise<StoredVersion> {
	const [row] = await tx.select().from(flowVersions).where(eq(flowVersions.id, id)).for('update');
	if (!row) throw refuse('not-found', 'No such draft or version.');
	return withStepOrder(row);
}

function assertStatus(row: StoredVersion, status: StoredVersion['status'], doing: string) {
	if (row.status === status) return;
	const now =
		row.status === 'published' || row.status === 'retired'
			? `version ${row.version} is ${row.status}`
			: `it is ${row.status}`;
	throw refuse(
		'state',
		`Cannot ${doing}: ${now}. Published versions never change; start a new draft instead.`
	);
}

/** A new draft: a copy of a published (or retired) version, or a new flow from a definition. */
export async function createDraft(
	actor: Actor,
	input: { fromVersionId: string } | { definition: unknown }
): Promise<StoredVersion> {
	assertSenior(actor);
	const db = await getDb();
	return db.transaction(async (tx) => {
		let definition: FlowDefinition;
		let basedOnId: string | null = null;
		if ('fromVersionId' in input) {
			const [from] = await tx.select().from(flowVersions).where(eq(flowVersions.id, input.fromVersionId));
			if (!from || from.version === null)
				throw refuse('not-found', 'Drafts start from a published version; that one does not exist.');
			definition = withStepOrder(from).definition;
			basedOnId = from.id;
		} else {
			definition = validShape(input.definition);
			assertUsableId(definition.id, 'choose another.');
			if (!(await addFlowRow(tx, definition)))
				throw refuse(
					'conflict',
					`A flow with the id "${definition.id}" already exists; start a draft from its published version, or choose another id.`
				);
		}
		return insertDraft(tx, actor, definition, basedOnId);
	});
}

/** Adds the flow's own row unless the library has it; true when it was new. */
async function addFlowRow(tx: Tx, definition: FlowDefinition): Promise<boolean> {
	const inserted = await tx
		.insert(flows)
		.values({ id: definition.id, title: definition.title, symptoms: definition.symptoms })
		.onConflictDoNothing()
		.returning({ id: flows.id });
	return inserted.length > 0;
}

/** Stores `definition` as a new draft of its flow and audits it. */
async function insertDraft(
	tx: Tx,
	actor: Actor,
	definition: FlowDefinition,
	basedOnId: string | null,
	details: Record<string, unknown> = {}
): Promise<StoredVersion> {
	const [row] = await tx
		.insert(flowVersions)
		.values({
			flowId: definition.id,
			status: 'draft',
			authorId: actor.id,
			basedOnId,
			...definitionColumns(definition)
		})
		.returning();
	await record(tx, {
		actorId: actor.id,
		action: 'flow.draft.create',
		targetType: 'flow',
		targetId: definition.id,
		details: { draftId: row.id, basedOnId, ...details }
	});
	return withStepOrder(row);
}

export type ImportedDraft = { draft: StoredVersion; problems: FlowProblem[]; newFlow: boolean };

/**
 * A `.flow.yaml` text as a new draft: parsed safely (see parseFlow: core schema, no custom tags,
 * size and alias caps). Text that is not a flow is refused with its problems and nothing is stored;
 * a flow with graph problems becomes a draft anyway, and the problems come back to be shown. A file
 * for a flow the library has becomes a draft of it (based on its newest published version).
 */
export async function importDraft(actor: Actor, text: string): Promise<ImportedDraft> {
	assertSenior(actor);
	const parsed = parseFlow(text);
	if (!parsed.ok)
		throw refuse(
			'invalid',
			'The file is not a flow yet; nothing was imported. Fix the problems below and try again.',
			parsed.problems
		);
	const definition = parsed.definition;
	assertUsableId(definition.id, 'nothing was imported. Change the id in the file and try again.');
	const problems = withLines(checkFlow(definition).problems, parsed.locate);
	const db = await getDb();
	return db.transaction(async (tx) => {
		const newFlow = await addFlowRow(tx, definition);
		const [base] = newFlow
			? []
			: await tx
					.select({ id: flowVersions.id })
					.from(flowVersions)
					.where(and(eq(flowVersions.flowId, definition.id), isNotNull(flowVersions.version)))
					.orderBy(desc(flowVersions.version))
					.limit(1);
		const draft = await insertDraft(tx, actor, definition, base?.id ?? null, {
			imported: true,
			problems: problems.length
		});
		return { draft, problems, newFlow };
	});
}

/**
 * Saves a draft if nobody saved it since `revision` was read; otherwise a conflict carrying the
 * draft as it is now. Returns the new revision.
 */
export async function saveDraft(
	actor: Actor,
	draftId: string,
	input: { revision: number; definition: unknown; changelog?: string | null }
): Promise<StoredVersion> {
	assertSenior(actor);
	const db = await getDb();
	return db.transaction(async (tx) => {
		const row = await lockVersion(tx, draftId);
		assertStatus(row, 'draft', 'edit this');
		if (row.revision !== input.revision)
			throw refuse(
				'conflict',
				'Someone saved this draft after you opened it. Load their version, or save yours over it knowingly.',
				[],
				row
			);
		const definition = validShape(input.definition);
		if (definition.id !== row.flowId)
			throw refuse('invalid', `A draft keeps its flow's id "${row.flowId}"; start a new flow for a new id.`, [
				{ code: 'schema', path: ['id'], message: `The id must stay "${row.flowId}".` }
			]);
		const [saved] = await tx
			.update(flowVersions)
			.set({
				...definitionColumns(definition),
				...(input.changelog !== undefined && { changelog: input.changelog }),
				revision: row.revision + 1,
				updatedAt: new Date()
			})
			.where(eq(flowVersions.id, draftId))
			.returning();
		await record(tx, {
			actorId: actor.id,
			action: 'flow.draft.save',
			targetType: 'flow',
			targetId: row.flowId,
			details: { draftId, revision: saved.revision }
		});
		return withStepOrder(saved);
	});
}

/** Hands a draft to review; only a draft that passes the check. */
export async function submit(actor: Actor, draftId: string): Promise<StoredVersion> {
	assertSenior(actor);
	const db = await getDb();
	return db.transaction(async (tx) => {
		const row = await lockVersion(tx, draftId);
		assertStatus(row, 'draft', 'submit this');
		const check = checkFlow(row.definition);
		if (!check.ok)
			throw refuse(
				'invalid',
				`The draft has ${check.problems.length} problem${check.problems.length === 1 ? '' : 's'}; fix them before review.`,
				check.problems
			);
		const [updated] = await tx
			.update(flowVersions)
			.set({
				status: 'in-review',
				submittedAt: new Date(),
				updatedAt: new Date(),
				revision: row.revision + 1
			})
			.where(eq(flowVersions.id, draftId))
			.returning();
		await record(tx, {
			actorId: actor.id,
			action: 'flow.submit',
			targetType: 'flow',
			targetId: row.flowId,
			details: { draftId }
		});
		return withStepOrder(updated);
	});
}

/** Nobody reviews a draft they wrote or saved: the author and every editor are excluded. */
async function assertFourEyes(tx: Tx, actor: Actor, row: StoredVersion, doing: string) {
	if (row.authorId === actor.id)
		throw refuse(
			'forbidden',
			`You wrote this draft, so you cannot ${doing} it: another senior or a lead reviews it.`
		);
	const [edited] = await tx
		.select({ id: auditLog.id })
		.from(auditLog)
		.where(
			and(
				eq(auditLog.action, 'flow.draft.save'),
				eq(auditLog.actorId, actor.id),
				sql`${auditLog.details}->>'draftId' = ${row.id}`
			)
		)
		.limit(1);
	if (edited)
		throw refuse(
			'forbidden',
			`You edited this draft, so you cannot ${doing} it: another senior or a lead reviews it.`
		);
}

/**
 * Why `actor` may not approve or send back this draft, or null when they may: the page hides the
 * review buttons from the author and every editor, and approve/sendBack refuse them anyway.
 */
export async function reviewRefusal(actor: Actor, draftId: string): Promise<string | null> {
	if (!hasRole(actor.role, 'senior')) return 'Only senior technicians and leads review flows.';
	const db = await getDb();
	return db.transaction(async (tx) => {
		const [row] = await tx.select().from(flowVersions).where(eq(flowVersions.id, draftId));
		if (!row) return 'No such draft.';
		if (row.status !== 'in-review') return 'Only a draft submitted for review can be approved or sent back.';
		try {
			await assertFourEyes(tx, actor, withStepOrder(row), 'review');
			return null;
		} catch (e) {
			if (e instanceof RuleError) return e.message;
			throw e;
		}
	});
}

/** Approval publishes the draft as the flow's next version number. */
export async function approve(actor: Actor, draftId: string): Promise<StoredVersion> {
	assertSenior(actor);
	const db = await getDb();
	return db.transaction(async (tx) => {
		const row = await lockVersion(tx, draftId);
		assertStatus(row, 'in-review', 'approve this');
		await assertFourEyes(tx, actor, row, 'approve');
		const check = checkFlow(row.definition);
		if (!check.ok) throw refuse('invalid', 'The draft no longer passes the check.', check.problems);
		// The flow row is the lock that makes "highest + 1" safe against a concurrent approval.
		await tx.select({ id: flows.id }).from(flows).where(eq(flows.id, row.flowId)).for('update');
		const version = (await highestVersion(tx, row.flowId)) + 1;
		const now = new Date();
		const [published] = await tx
			.update(flowVersions)
			.set({ status: 'published', version, reviewerId: actor.id, publishedAt: now, updatedAt: now })
			.where(eq(flowVersions.id, draftId))
			.returning();
		await tx
			.update(flows)
			.set({ title: row.definition.title, symptoms: row.definition.symptoms })
			.where(eq(flows.id, row.flowId));
		await record(tx, {
			actorId: actor.id,
			action: 'flow.approve',
			targetType: 'flow',
			targetId: row.flowId,
			details: { draftId }
		});
		await record(tx, {
			actorId: actor.id,
			action: 'flow.publish',
			targetType: 'flow',
			targetId: row.flowId,
			details: { draftId, version, checksum: row.checksum }
		});
		return withStepOrder(published);
	});
}

/** Back to the author as a draft, with the reviewer's comment. */
export async function sendBack(actor: Actor, draftId: string, comment: string): Promise<StoredVersion> {
	assertSenior(actor);
	const text = comment.trim();
	if (!text) throw refuse('invalid', 'Say what needs changing, so the author knows.');
	const db = await getDb();
	return db.transaction(async (tx) => {
		const row = await lockVersion(tx, draftId);
		assertStatus(row, 'in-review', 'send this back');
		await assertFourEyes(tx, actor, row, 'send back');
		const [updated] = await tx
			.update(flowVersions)
			.set({
				status: 'draft',
				reviewComment: text,
				reviewerId: actor.id,
				revision: row.revision + 1,
				updatedAt: new Date()
			})
			.where(eq(flowVersions.id, draftId))
			.returning();
		await record(tx, {
			actorId: actor.id,
			action: 'flow.send-back',
			targetType: 'flow',
			targetId: row.flowId,
			details: { draftId, comment: text }
		});
		return withStepOrder(updated);
	});
}

/** No new runs start on a retired version; runs already under way finish on it. */
export async function retire(actor: Actor, flowId: string, version: number): Promise<StoredVersion> {
	assertSenior(actor);
	const db = await getDb();
	return db.transaction(async (tx) => {
		const [found] = await tx
			.select({ id: flowVersions.id })
			.from(flowVersions)
			.where(and(eq(flowVersions.flowId, flowId), eq(flowVersions.version, version)));
		if (!found) throw refuse('not-found', `Flow "${flowId}" has no version ${version}.`);
		const row = await lockVersion(tx, found.id);
		assertStatus(row, 'published', 'retire this');
		const now = new Date();
		const [retired] = await tx
			.update(flowVersions)
			.set({ status: 'retired', retiredAt: now, updatedAt: now })
			.where(eq(flowVersions.id, row.id))
			.returning();
		await record(tx, {
			actorId: actor.id,
			action: 'flow.retire',
			targetType: 'flow',
			targetId: flowId,
			details: { version }
		});
		return withStepOrder(retired);
	});
}
