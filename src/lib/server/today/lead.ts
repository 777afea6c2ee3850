/**
 * The lead's Today: the shop's day (intake, phones to hand back, broken promises, quotes the
 * customer has not answered, mail that did not go out) and the verdicts that are rising, read from
 * the insights' own trend (never recomputed here).
 */
import { and, asc, desc, eq, gte, inArray, sql } from 'drizzle-orm';
import { getDb } from '$lib/server/db';
import { customers, jobEvents, jobs } from '$lib/server/db/schema/jobs';
import { quotes } from '$lib/server/db/schema/quotes';
import { outgoingMail } from '$lib/server/db/schema/mail';
import * as insights from '$lib/server/insights/queries';
import { risingVerdicts } from '$lib/insights/rising';
import { isOpenSql, overdueSql } from '$lib/server/jobs/urgency-sql';
import { openStatuses } from '$lib/domain/queue';
import { jobColumns as todayColumns } from './queries';

const jobColumns = { ...todayColumns, createdAt: jobs.createdAt };

/** Jobs taken in since `dayStart`, newest first. */
export async function intakeSince(dayStart: Date) {
	const db = await getDb();
	return db
		.select(jobColumns)
		.from(jobs)
		.innerJoin(customers, eq(customers.id, jobs.customerId))
		.where(gte(jobs.createdAt, dayStart))
		.orderBy(desc(jobs.createdAt))
		.limit(50);
}

/** Phones ready to hand back (oldest first: they have waited longest), and how many were collected since `dayStart`. */
export async function collections(dayStart: Date) {
	const db = await getDb();
	const readySince = sql<Date>`(select max(${jobEvents.at}) from ${jobEvents}
		where ${jobEvents.jobId} = ${jobs.id} and ${jobEvents.toStatus} = 'ready')`;
	const [ready, [{ collected }]] = await Promise.all([
		db
			.select({ ...jobColumns, readySince })
			.from(jobs)
			.innerJoin(customers, eq(customers.id, jobs.customerId))
			.where(eq(jobs.status, 'ready'))
			.orderBy(asc(jobs.updatedAt))
			.limit(50),
		db
			.select({ collected: sql<number>`count(distinct ${jobEvents.jobId})::int` })
			.from(jobEvents)
			.where(and(eq(jobEvents.toStatus, 'collected'), gte(jobEvents.at, dayStart)))
	]);
	return { ready, collectedToday: collected };
}

/** Open jobs past their promised day, the longest overdue first. */
export async function overdue(now: Date) {
	const db = await getDb();
	return db
		.select(jobColumns)
		.from(jobs)
		.innerJoin(customers, eq(customers.id, jobs.customerId))
		.where(overdueSql(now))
		.orderBy(asc(jobs.promisedAt))
		.limit(50);
}

export async function overdueCount(now: Date) {
	const db = await getDb();
	const [{ n }] = await db
		.select({ n: sql<number>`count(*)::int` })
		.from(jobs)
		.where(overdueSql(now));
	return n;
}

/** Sent quotes (the job's newest version) unanswered for longer than `hours`, the longest first. */
export async function quotesWaiting(now: Date, hours: number) {
	const db = await getDb();
	const newest = sql`${quotes.version} = (select max(q2.version) from ${quotes} q2 where q2.job_id = ${quotes.jobId})`;
	return db
		.select({
			...jobColumns,
			quoteId: quotes.id,
			sentAt: quotes.sentAt,
			grossMinor: quotes.grossMinor,
			currency: quotes.currency
		})
		.from(quotes)
		.innerJoin(jobs, eq(jobs.id, quotes.jobId))
		.innerJoin(customers, eq(customers.id, jobs.customerId))
		.where(
			and(
				eq(quotes.status, 'sent'),
				newest,
				isOpenSql,
				sql`${quotes.sentAt} < ${new Date(now.getTime() - hours * 3_600_000).toISOString()}::timestamptz`
			)
		)
		.orderBy(asc(quotes.sentAt))
		.limit(50);
}

/** E-mails that gave up (the Outbox retries them), newest first, and how many. */
export async function failedMail(limit = 8) {
	const db = await getDb();
	const [rows, [{ n }]] = await Promise.all([
		db
			.select({
				id: outgoingMail.id,
				to: outgoingMail.to,
				subject: outgoingMail.subject,
				lastError: outgoingMail.lastError,
				updatedAt: outgoingMail.updatedAt
			})
			.from(outgoingMail)
			.where(eq(outgoingMail.status, 'failed'))
			.orderBy(desc(outgoingMail.updatedAt))
			.limit(limit),
		db
			.select({ n: sql<number>`count(*)::int` })
			.from(outgoingMail)
			.where(eq(outgoingMail.status, 'failed'))
	]);
	return { rows, total: n };
}

export async function failedMailCount() {
	const db = await getDb();
	const [{ n }] = await db
		.select({ n: sql<number>`count(*)::int` })
		.from(outgoingMail)
		.where(eq(outgoingMail.status, 'failed'));
	return n;
}

/** The verdicts rising in the last four weeks (Insights' rule, $lib/insights/rising), with titles. */
export async function rising() {
	const [trend, verdicts] = await Promise.all([insights.trend({}), insights.verdicts({})]);
	const titles = new Map(verdicts.rows.map((r) => [r.verdictCode, `${r.verdictTitle} (${r.flowTitle})`]));
	return risingVerdicts(trend).map((r) => ({ ...r, title: titles.get(r.code) ?? r.code }));
}

/** Jobs still open, for the lead's headline. */
export async function openCount() {
	const db = await getDb();
	const [{ n }] = await db
		.select({ n: sql<number>`count(*)::int` })
		.from(jobs)
		.where(inArray(jobs.status, [...openStatuses]));
	return n;
}
