/**
 * Today, the bench's lists: what a technician resumes, picks up next, owes the next step, or can
 * take; and what a senior reviews, gets back, and should know was overturned. Each function is one
 * short read (the page runs them side by side); the lead's lists are in `lead.ts`.
 */
import { RuleError } from '$lib/server/errors';
import { and, desc, eq, gt, inArray, isNotNull, isNull, ne, sql } from 'drizzle-orm';
import { alias } from 'drizzle-orm/pg-core';
import { getDb } from '$lib/server/db';
import { userSeen, users } from '$lib/server/db/schema/users';
import { customers, jobs } from '$lib/server/db/schema/jobs';
import { runs } from '$lib/server/db/schema/runs';
import { flowVersions } from '$lib/server/db/schema/flows';
import { quotes } from '$lib/server/db/schema/quotes';
import { verdictConfirmations } from '$lib/server/db/schema/insights';
import { record } from '$lib/server/audit';
import * as flowLibrary from '$lib/server/flows/queries';
import { byUrgency, openStatuses } from '$lib/domain/queue';
import type { JobStatus } from '$lib/domain/jobStatus';
import type { LiquidKind } from '$lib/domain/liquid';

const HOUR = 3_600_000;
/** How far back "overturned since I last looked" reaches for someone who never looked. */
export const FIRST_LOOK_DAYS = 30;

/** The columns a Today job line shows (the lead's lists add when it came in). */
export const jobColumns = {
	id: jobs.id,
	number: jobs.number,
	maker: jobs.maker,
	model: jobs.model,
	customerName: customers.name,
	status: jobs.status,
	liquid: jobs.liquid,
	exposedAt: jobs.exposedAt,
	promisedAt: jobs.promisedAt,
	dataFirst: jobs.dataFirst
};
export type TodayJob = {
	id: string;
	number: number;
	maker: string;
	model: string;
	customerName: string;
	status: JobStatus;
	liquid: LiquidKind;
	exposedAt: Date | null;
	promisedAt: Date | null;
	dataFirst: boolean;
};

/** My runs still under way, newest activity first, with the step each stands on. */
export async function runsInProgress(userId: string) {
	const db = await getDb();
	return db
		.select({
			id: runs.id,
			jobId: runs.jobId,
			jobNumber: jobs.number,
			device: sql<string>`${jobs.maker} || ' ' || ${jobs.model}`,
			flowTitle: sql<string>`${flowVersions.definition}->>'title'`,
			stepTitle: sql<string>`coalesce(${flowVersions.definition}->'steps'->${runs.currentStep}->>'title', ${runs.currentStep})`,
			updatedAt: runs.updatedAt
		})
		.from(runs)
		.innerJoin(jobs, eq(jobs.id, runs.jobId))
		.innerJoin(flowVersions, eq(flowVersions.id, runs.flowVersionId))
		.where(and(eq(runs.technicianId, userId), eq(runs.status, 'in-progress')))
		.orderBy(desc(runs.updatedAt))
		.limit(20);
}

/** The latest quote of each job is approved: the customer said yes, the repair can start. */
const quoteApproved = sql<boolean>`(select ${quotes.status} = 'approved' from ${quotes}
	where ${quotes.jobId} = ${jobs.id} order by ${quotes.version} desc limit 1) is true`;

export type WaitingJob = TodayJob & { next: 'repair' | 'function-test' };

/**
 * My open jobs split in two: the ones whose next step is mine by the workflow (quote approved →
 * repair, repair done → function test), and the rest in urgency order (queue.ts), live as of `now`.
 */
export async function myJobs(userId: string, now: Date) {
	const db = await getDb();
	const rows = await db
		.select({ ...jobColumns, approved: quoteApproved })
		.from(jobs)
		.innerJoin(customers, eq(customers.id, jobs.customerId))
		.where(and(eq(jobs.technicianId, userId), inArray(jobs.status, [...openStatuses])))
		.limit(200);
	const waiting: WaitingJob[] = [];
	const rest: TodayJob[] = [];
	for (const { approved, ...job } of rows) {
		if (job.status === 'testing') waiting.push({ ...job, next: 'function-test' });
		else if (job.status === 'repairing' || (job.status === 'awaiting-approval' && approved))
			waiting.push({ ...job, next: 'repair' });
		else rest.push(job);
	}
	return { queue: byUrgency(rest, now), waiting: byUrgency(waiting, now) };
}

/** Open jobs nobody has taken, most urgent first (the first `limit`), and how many there are. */
export async function unassigned(now: Date, limit = 8) {
	const db = await getDb();
	const rows = await db
		.select(jobColumns)
		.from(jobs)
		.innerJoin(customers, eq(customers.id, jobs.customerId))
		.where(and(isNull(jobs.technicianId), inArray(jobs.status, ['received', 'diagnosing'])))
		.limit(500);
	return { rows: byUrgency(rows, now).slice(0, limit), total: rows.length };
}

/** Takes an unassigned job for `userId`; refused when someone else took it first. */
export async function take(jobId: string, userId: string) {
	const db = await getDb();
	return db.transaction(async (tx) => {
		const [job] = /^[0-9a-f-]{36}$/i.test(jobId)
			? await tx.select().from(jobs).where(eq(jobs.id, jobId)).for('update')
			: [];
		if (!job) throw new RuleError(409, 'not-found', 'That job no longer exists.');
		if (job.technicianId === userId) return job;
		if (job.technicianId) {
			const [other] = await tx.select({ name: users.name }).from(users).where(eq(users.id, job.technicianId));
			throw new RuleError(409, 'taken', `${other?.name ?? 'Someone'} took this job first.`);
		}
		const [updated] = await tx
			.update(jobs)
			.set({ technicianId: userId, updatedAt: new Date() })
			.where(eq(jobs.id, jobId))
			.returning();
		await record(tx, {
			actorId: userId,
			action: 'job.assign',
			targetType: 'job',
			targetId: jobId,
			details: { from: null, to: userId, taken: true }
		});
		return updated;
	});
}

/** Drafts in review that `userId` may review: not written or edited by them (the four-eyes rule). */
export function reviewsWaiting(userId: string) {
	return flowLibrary.awaitingReview(userId, 50);
}

/** How many drafts wait for this member's review (the navigation's count). */
export async function reviewsWaitingCount(userId: string) {
	return (await reviewsWaiting(userId)).length;
}

const reviewer = alias(users, 'reviewer');

/** My drafts a reviewer sent back, with their note, until I submit again. */
export async function sentBack(userId: string) {
	const db = await getDb();
	return db
		.select({
			id: flowVersions.id,
			flowId: flowVersions.flowId,
			title: sql<string>`${flowVersions.definition}->>'title'`,
			note: flowVersions.reviewComment,
			reviewerName: reviewer.name,
			updatedAt: flowVersions.updatedAt
		})
		.from(flowVersions)
		.leftJoin(reviewer, eq(reviewer.id, flowVersions.reviewerId))
		.where(
			and(
				eq(flowVersions.status, 'draft'),
				eq(flowVersions.authorId, userId),
				isNotNull(flowVersions.reviewComment),
				ne(flowVersions.reviewComment, '')
			)
		)
		.orderBy(desc(flowVersions.updatedAt))
		.limit(20);
}

/** When `userId` last marked `list` as seen, or null. */
export async function seenAt(userId: string, list: string): Promise<Date | null> {
	const db = await getDb();
	const [row] = await db
		.select({ at: userSeen.seenAt })
		.from(userSeen)
		.where(and(eq(userSeen.userId, userId), eq(userSeen.list, list)));
	return row?.at ?? null;
}

export async function markSeen(userId: string, list: string, at = new Date()) {
	const db = await getDb();
	await db
		.insert(userSeen)
		.values({ userId, list, seenAt: at })
		.onConflictDoUpdate({ target: [userSeen.userId, userSeen.list], set: { seenAt: at } });
}

const judge = alias(users, 'judge');

/**
 * Verdicts the repair overturned (the newest word on the run says "did not hold") after `since`,
 * newest first: the first `limit` and how many.
 */
export async function overturnedSince(since: Date, limit = 5) {
	const db = await getDb();
	const newest = sql`not exists (select 1 from ${verdictConfirmations} later
		where later.run_id = ${verdictConfirmations.runId} and (later.at, later.id) > (${verdictConfirmations.at}, ${verdictConfirmations.id}))`;
	const where = and(eq(verdictConfirmations.confirmed, false), gt(verdictConfirmations.at, since), newest);
	const [rows, [{ n }]] = await Promise.all([
		db
			.select({
				runId: runs.id,
				jobId: runs.jobId,
				jobNumber: jobs.number,
				flowId: flowVersions.flowId,
				flowTitle: sql<string>`${flowVersions.definition}->>'title'`,
				verdictTitle: sql<string>`coalesce(${flowVersions.definition}->'steps'->${runs.verdictStep}->>'title', ${runs.verdictCode})`,
				note: verdictConfirmations.note,
				byName: judge.name,
				at: verdictConfirmations.at
			})
			.from(verdictConfirmations)
			.innerJoin(runs, eq(runs.id, verdictConfirmations.runId))
			.innerJoin(jobs, eq(jobs.id, runs.jobId))
			.innerJoin(flowVersions, eq(flowVersions.id, runs.flowVersionId))
			.leftJoin(judge, eq(judge.id, verdictConfirmations.by))
			.where(where)
			.orderBy(desc(verdictConfirmations.at))
			.limit(limit),
		db
			.select({ n: sql<number>`count(*)::int` })
			.from(verdictConfirmations)
			.where(where)
	]);
	return { rows, total: n };
}

/** The overturned verdicts since this member last looked (or the last FIRST_LOOK_DAYS days). */
export async function overturnedFor(userId: string, now: Date) {
	const seen = await seenAt(userId, 'overturned');
	const since = seen ?? new Date(now.getTime() - FIRST_LOOK_DAYS * 24 * HOUR);
	return { ...(await overturnedSince(since)), since, seen };
}
