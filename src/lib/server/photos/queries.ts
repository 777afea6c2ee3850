// Over 300 lines on purpose: every query of one table and its files (store, list, read, caption, visibility, remove).
/**
 * Photos of a job (and of the run step they were taken at): store, list, read back, caption,
 * customer visibility, remove. Files go to the blob store by content hash; each change is audited
 * in the same transaction as its row.
 */
import { and, asc, desc, eq, or, sql } from 'drizzle-orm';
import { getDb, type Tx } from '$lib/server/db';
import { users } from '$lib/server/db/schema';
import { jobs } from '$lib/server/db/schema/jobs';
import { runs, runSteps } from '$lib/server/db/schema/runs';
import { flowVersions } from '$lib/server/db/schema/flows';
import { attachments, type Attachment } from '$lib/server/db/schema/attachments';
import { record } from '$lib/server/audit';
import { getStore, keyOf, type BlobStore } from '$lib/server/storage';
import { hasRole, type Role } from '$lib/roles';
import { photoUrl, type PhotoDto, type PhotoSize, type PhotoSource } from '$lib/photos/limits';
import { processPhoto } from './process';
import { RuleError } from '$lib/server/errors';

export type PhotoTarget = {
	jobId: string;
	runId?: string | null;
	stepId?: string | null;
	runStepId?: number | null;
};
export type PhotoInput = { bytes: Uint8Array; source: PhotoSource; caption?: string };
type Actor = { id: string; role: Role };

const columns = {
	row: attachments,
	uploadedByName: users.name
};

function toDto(row: Attachment, uploadedByName: string | null): PhotoDto {
	return {
		id: row.id,
		jobId: row.jobId,
		runId: row.runId,
		stepId: row.stepId,
		source: row.source,
		caption: row.caption,
		mime: row.mime,
		width: row.width,
		height: row.height,
		bytes: row.bytes,
		uploadedBy: row.uploadedBy,
		uploadedByName,
		createdAt: row.createdAt.toISOString(),
		shownToCustomer: row.shownToCustomer,
		thumbUrl: photoUrl(row.id, 'thumb'),
		displayUrl: photoUrl(row.id, 'display'),
		originalUrl: photoUrl(row.id, 'original')
	};
}

/**
 * Serialises work on the same blobs across transactions (and, on PostgreSQL, across processes):
 * an upload that reuses a blob and a removal that would delete it cannot interleave.
 */
async function lockKeys(tx: Tx, keys: string[]) {
	for (const key of [...new Set(keys)].sort()) {
		await tx.execute(sql`select pg_advisory_xact_lock(hashtextextended(${'blob:' + key}, 0))`);
	}
}

/**
 * Where a run photo goes: the run's job, the run, and the step, which must be a step of the run's
 * pinned flow version. A step not reached yet is accepted on purpose: the screen moves on before
 * its answer reaches the server, and a photo of the new step must not fail in that moment.
 */
export async function runTarget(runId: string, stepId: string): Promise<PhotoTarget> {
	const db = await getDb();
	const [run] = await db
		.select({
			jobId: runs.jobId,
			steps: sql<string[]>`array(select jsonb_object_keys(${flowVersions.definition}->'steps'))`
		})
		.from(runs)
		.innerJoin(flowVersions, eq(flowVersions.id, runs.flowVersionId))
		.where(eq(runs.id, runId));
	if (!run) throw new RuleError(404, 'not-found', 'No such run.');
	if (!run.steps.includes(stepId)) {
		throw new RuleError(400, 'unknown-step', `The flow of this run has no step "${stepId}".`);
	}
	// The latest answer at that step, if it has one, ties the photo to that recorded answer.
	const [answered] = await db
		.select({ id: runSteps.id })
		.from(runSteps)
		.where(and(eq(runSteps.runId, runId), eq(runSteps.stepId, stepId)))
		.orderBy(desc(runSteps.seq))
		.limit(1);
	return { jobId: run.jobId, runId, stepId, runStepId: answered?.id ?? null };
}

/**
 * Checks, strips and stores a photo, then records it. The same file uploaded again to the same job
 * and step (a retried upload) returns the photo already stored instead of a second copy.
 */
export async function add(
	actorId: string,
	target: PhotoTarget,
	input: PhotoInput,
	store: BlobStore = getStore()
): Promise<{ photo: PhotoDto; duplicate: boolean }> {
	const db = await getDb();
	const [job] = await db.select({ id: jobs.id }).from(jobs).where(eq(jobs.id, target.jobId));
	if (!job) throw new RuleError(404, 'not-found', 'No such job.');
	// Decoding and re-encoding is the slow part; it happens before any transaction is open.
	const photo = await processPhoto(input.bytes);
	const runId = target.runId ?? null;
	const stepId = target.stepId ?? null;
	return db.transaction(async (tx) => {
		const [same] = await tx
			.select(columns)
			.from(attachments)
			.leftJoin(users, eq(users.id, attachments.uploadedBy))
			.where(
				and(
					eq(attachments.jobId, target.jobId),
					eq(attachments.sha256, photo.uploadSha256),
					runId ? eq(attachments.runId, runId) : sql`${attachments.runId} is null`,
					stepId ? eq(attachments.stepId, stepId) : sql`${attachments.stepId} is null`
				)
			);
		if (same) return { photo: toDto(same.row, same.uploadedByName), duplicate: true };

		const variants = [photo.original, photo.display, photo.thumb];
		const stored = [];
		await lockKeys(
			tx,
			variants.map((v) => keyOf(v.bytes))
		);
		for (const v of variants) stored.push(await store.put(v.bytes));
		const [row] = await tx
			.insert(attachments)
			.values({
				jobId: target.jobId,
				runId,
				stepId,
				runStepId: target.runStepId ?? null,
				kind: 'photo',
				source: input.source,
				caption: (input.caption ?? '').trim(),
				sha256: photo.uploadSha256,
				originalKey: stored[0].key,
				displayKey: stored[1].key,
				thumbKey: stored[2].key,
				mime: photo.original.mime,
				width: photo.original.width,
				height: photo.original.height,
				bytes: photo.original.bytes.byteLength,
				uploadedBy: actorId
			})
			.returning();
		await record(tx, {
			actorId,
			action: 'photo.add',
			targetType: 'job',
			targetId: target.jobId,
			details: {
				photoId: row.id,
				runId,
				stepId,
				source: row.source,
				sha256: row.sha256,
				width: row.width,
				height: row.height,
				bytes: row.bytes
			}
		});
		const [uploader] = await tx.select({ name: users.name }).from(users).where(eq(users.id, actorId));
		return { photo: toDto(row, uploader?.name ?? null), duplicate: false };
	});
}

export async function get(id: string): Promise<PhotoDto | undefined> {
	const db = await getDb();
	const [found] = await db
		.select(columns)
		.from(attachments)
		.leftJoin(users, eq(users.id, attachments.uploadedBy))
		.where(eq(attachments.id, id));
	return found ? toDto(found.row, found.uploadedByName) : undefined;
}

/** Every photo of a job, run photos included, oldest first (the order they were taken in). */
export async function listForJob(jobId: string): Promise<PhotoDto[]> {
	const db = await getDb();
	const rows = await db
		.select(columns)
		.from(attachments)
		.leftJoin(users, eq(users.id, attachments.uploadedBy))
		.where(eq(attachments.jobId, jobId))
		.orderBy(asc(attachments.createdAt), asc(attachments.id));
	return rows.map((r) => toDto(r.row, r.uploadedByName));
}

/** The photos of one run, optionally of one of its steps. */
export async function listForRun(runId: string, stepId?: string): Promise<PhotoDto[]> {
	const db = await getDb();
	const rows = await db
		.select(columns)
		.from(attachments)
		.leftJoin(users, eq(users.id, attachments.uploadedBy))
		.where(and(eq(attachments.runId, runId), stepId ? eq(attachments.stepId, stepId) : undefined))
		.orderBy(asc(attachments.createdAt), asc(attachments.id));
	return rows.map((r) => toDto(r.row, r.uploadedByName));
}

/** The stored bytes of one size of a photo, or null if the photo (or its file) is gone. */
export async function read(
	id: string,
	size: PhotoSize,
	store: BlobStore = getStore()
): Promise<{ bytes: Uint8Array; mime: string; key: string } | null> {
	const db = await getDb();
	const [row] = await db.select().from(attachments).where(eq(attachments.id, id));
	if (!row) return null;
	const key = size === 'thumb' ? row.thumbKey : size === 'display' ? row.displayKey : row.originalKey;
	const bytes = await store.get(key);
	if (!bytes) return null;
	return { bytes, mime: size === 'original' ? row.mime : 'image/webp', key };
}

/** Whoever uploaded a photo may change or remove it; seniors and leads may change any. */
function assertMayChange(actor: Actor, row: Attachment) {
	if (row.uploadedBy !== actor.id && !hasRole(actor.role, 'senior')) {
		throw new RuleError(
			403,
			'forbidden',
			'Only the person who uploaded this photo, a senior technician or the shop lead can change it.'
		);
	}
}

export async function update(
	actor: Actor,
	id: string,
	changes: { caption?: string; shownToCustomer?: boolean }
): Promise<PhotoDto> {
	const db = await getDb();
	return db.transaction(async (tx) => {
		const [row] = await tx.select().from(attachments).where(eq(attachments.id, id)).for('update');
		if (!row) throw new RuleError(404, 'not-found', 'No such photo.');
		assertMayChange(actor, row);
		const set: Partial<Attachment> = {};
		if (changes.caption !== undefined) set.caption = changes.caption.trim();
		if (changes.shownToCustomer !== undefined) set.shownToCustomer = changes.shownToCustomer;
		const [updated] = await tx.update(attachments).set(set).where(eq(attachments.id, id)).returning();
		await record(tx, {
			actorId: actor.id,
			action: 'photo.update',
			targetType: 'job',
			targetId: row.jobId,
			details: { photoId: id, ...changes }
		});
		const [uploader] = row.uploadedBy
			? await tx.select({ name: users.name }).from(users).where(eq(users.id, row.uploadedBy))
			: [];
		return toDto(updated, uploader?.name ?? null);
	});
}

/**
 * Removes a photo and, when no other photo uses them, its files. The audit entry keeps the upload's
 * hash, so what was removed can still be identified.
 */
export async function remove(actor: Actor, id: string, store: BlobStore = getStore()) {
	const db = await getDb();
	return db.transaction(async (tx) => {
		const [row] = await tx.select().from(attachments).where(eq(attachments.id, id)).for('update');
		if (!row) throw new RuleError(404, 'not-found', 'No such photo.');
		assertMayChange(actor, row);
		const keys = [row.originalKey, row.displayKey, row.thumbKey];
		await lockKeys(tx, keys);
		await tx.delete(attachments).where(eq(attachments.id, id));
		const stillUsed = await tx
			.select({ o: attachments.originalKey, d: attachments.displayKey, t: attachments.thumbKey })
			.from(attachments)
			.where(
				or(
					...keys.flatMap((k) => [
						eq(attachments.originalKey, k),
						eq(attachments.displayKey, k),
						eq(attachments.thumbKey, k)
					])
				)
			);
		const used = new Set(stillUsed.flatMap((r) => [r.o, r.d, r.t]));
		await record(tx, {
			actorId: actor.id,
			action: 'photo.remove',
			targetType: 'job',
			targetId: row.jobId,
			details: {
				photoId: id,
				runId: row.runId,
				stepId: row.stepId,
				sha256: row.sha256,
				caption: row.caption,
				uploadedBy: row.uploadedBy
			}
		});
		// Files last, with the keys still locked: if deleting fails, the row and audit entry roll back.
		const removedFiles = [];
		for (const key of new Set(keys)) {
			if (!used.has(key) && (await store.delete(key))) removedFiles.push(key);
		}
		return { jobId: row.jobId, removedFiles: removedFiles.length };
	});
}
