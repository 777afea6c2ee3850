// Over 300 lines on purpose: one table's rules (intake, list, history, status, assignment) in one transaction each.
/**
 * Jobs: intake, the job list, one job with its history, status changes and assignment.
 * Every change runs in one transaction with its job_events row (for status) and its audit record.
 * Runs build on `get`, `lockJob` and `transition`.
 */
import { isUuid } from '$lib/schemas/ids';
import { RuleError } from '$lib/server/errors';
import { and, asc, desc, eq, ilike, isNull, or, sql, type SQL } from 'drizzle-orm';
import { alias } from 'drizzle-orm/pg-core';
import { getDb, type Tx } from '$lib/server/db';
import { users } from '$lib/server/db/schema';
import { customers, jobEvents, jobs, type Job } from '$lib/server/db/schema/jobs';
import { record } from '$lib/server/audit';
import * as settings from '$lib/server/settings/queries';
import { assessExposure } from '$lib/domain/exposure';
import type { LiquidKind } from '$lib/domain/liquid';
import { urgencyRank } from '$lib/domain/queue';
import { isOpenSql, overdueSql, urgencyRankSql } from './urgency-sql';
import type { PreRepairTest } from '$lib/domain/functionTests';
import { readyGate } from '$lib/server/checklists/gate';
import { normaliseImei } from '$lib/domain/identifiers';
import {
	canTransition,
	jobStatuses,
	nextStatuses,
	statusLabels,
	type JobStatus
} from '$lib/domain/jobStatus';
import {
	exposedAtOf,
	exposureOf,
	normaliseSerial,
	promisedAtOf,
	ratingOf,
	type JobIntake,
	type JobListQuery
} from '$lib/schemas/job';

export { formatJobNumber } from '$lib/schemas/job';

export { nextStatuses };

/** `preRepairTest`: what worked when the phone came in (checklists/preRepair.ts builds it). */
export async function create(
	actorId: string | null,
	input: JobIntake,
	preRepairTest: PreRepairTest | null = null
): Promise<Job> {
	// The schema refuses these as null; checked again so the columns' NOT NULL is never the message.
	const { liquid, passcodeStatus } = input;
	if (liquid === null) throw new RuleError(400, 'invalid-input', 'Choose the liquid.', { field: 'liquid' });
	if (passcodeStatus === null)
		throw new RuleError(400, 'invalid-input', 'Choose the passcode status.', { field: 'passcodeStatus' });
	const db = await getDb();
	const rating = ratingOf(input);
	const exposure = exposureOf(input);
	const assessment = assessExposure(rating, exposure);
	const { turnaroundDays } = await settings.getWorkflow();
	return db.transaction(async (tx) => {
		const [customer] = await tx
			.insert(customers)
			.values({
				name: input.customerName.trim(),
				email: input.customerEmail ? input.customerEmail.trim().toLowerCase() : null,
				phone: input.customerPhone ? input.customerPhone.trim() : null
			})
			.returning();
		const now = new Date();
		const [job] = await tx
			.insert(jobs)
			.values({
				customerId: customer.id,
				maker: input.maker.trim(),
				model: input.model.trim(),
				imei: input.imei ? normaliseImei(input.imei) : null,
				serial: input.serial ? normaliseSerial(input.serial) : null,
				symptoms: [...new Set(input.symptoms)],
				liquid,
				exposedAt: exposedAtOf(input),
				submerged: input.submerged,
				depthM: exposure.submerged ? (exposure.depthM ?? null) : null,
				minutes: exposure.submerged ? (exposure.minutes ?? null) : null,
				liquidTemperature: exposure.temperature ?? null,
				waterMotion: exposure.motion ?? null,
				soapy: exposure.soapy ?? null,
				rating,
				exposureAssessment: assessment,
				dataFirst: input.dataFirst,
				passcodeStatus,
				consentToOpen: input.consentToOpen,
				consentAt: input.consentToOpen ? now : null,
				notes: input.notes.trim(),
				promisedAt: promisedAtOf(input, turnaroundDays, now),
				preRepairTest,
				status: 'received',
				createdBy: actorId
			})
			.returning();
		await tx
			.insert(jobEvents)
			.values({ jobId: job.id, fromStatus: null, toStatus: 'received', by: actorId, note: 'Taken in' });
		await record(tx, {
			actorId,
			action: 'job.create',
			targetType: 'job',
			targetId: job.id,
			details: {
				number: job.number,
				exposure: assessment.status,
				consent: job.consentToOpen,
				...(preRepairTest ? { preRepairTest: preRepairSummary(preRepairTest) } : {})
			}
		});
		return job;
	});
}

function preRepairSummary(test: PreRepairTest) {
	return {
		couldNotPowerOn: test.couldNotPowerOn,
		failed: test.items.filter((i) => i.result === 'fail').map((i) => i.key)
	};
}

const technician = alias(users, 'technician');

const listColumns = {
	id: jobs.id,
	number: jobs.number,
	customerName: customers.name,
	maker: jobs.maker,
	model: jobs.model,
	imei: jobs.imei,
	serial: jobs.serial,
	status: jobs.status,
	exposureStatus: sql<string>`${jobs.exposureAssessment}->>'status'`,
	dataFirst: jobs.dataFirst,
	technicianId: jobs.technicianId,
	technicianName: technician.name,
	liquid: jobs.liquid,
	exposedAt: jobs.exposedAt,
	promisedAt: jobs.promisedAt,
	createdAt: jobs.createdAt,
	updatedAt: jobs.updatedAt
};

export type JobListRow = {
	id: string;
	number: number;
	customerName: string;
	maker: string;
	model: string;
	imei: string | null;
	serial: string | null;
	status: JobStatus;
	exposureStatus: string;
	dataFirst: boolean;
	technicianId: string | null;
	technicianName: string | null;
	liquid: LiquidKind;
	exposedAt: Date | null;
	promisedAt: Date | null;
	createdAt: Date;
	updatedAt: Date;
};

export type JobList = { rows: JobListRow[]; total: number; page: number; size: number; pages: number };

/** `%` and `_` typed in the search box are literal characters, not wildcards. */
const likeEscape = (s: string) => s.replace(/[\\%_]/g, (c) => `\\${c}`);

function searchCondition(q: string): SQL | undefined {
	const text = q.trim();
	if (!text) return undefined;
	const like = `%${likeEscape(text)}%`;
	const parts: (SQL | undefined)[] = [
		ilike(customers.name, like),
		ilike(customers.email, like),
		ilike(sql`${jobs.maker} || ' ' || ${jobs.model}`, like),
		ilike(jobs.serial, `%${likeEscape(normaliseSerial(text))}%`)
	];
	const digits = text.replace(/[\s-]/g, '');
	if (/^\d{3,}$/.test(digits)) {
		parts.push(ilike(jobs.imei, `%${digits}%`));
		parts.push(ilike(sql`regexp_replace(${customers.phone}, '[^0-9]', '', 'g')`, `%${digits}%`));
	}
	const number = /^(?:TM-?)?0*(\d{1,9})$/i.exec(text);
	if (number) parts.push(eq(jobs.number, Number(number[1])));
	return or(...parts);
}

const statusOrder = sql.raw(
	`array_position(array[${jobStatuses.map((s) => `'${s}'`).join(',')}]::text[], jobs.status)`
);

function orderFor(query: JobListQuery, now: Date): SQL[] {
	const d = query.dir === 'asc' ? asc : desc;
	const byNumber = desc(jobs.number);
	switch (query.sort) {
		case 'urgency':
			// "desc" (the default) is most urgent first, as queue.ts compareUrgency orders; closed jobs last.
			return query.dir === 'asc'
				? [desc(isOpenSql), asc(urgencyRankSql(now)), sql`${jobs.exposedAt} desc nulls first`, byNumber]
				: [
						desc(isOpenSql),
						desc(urgencyRankSql(now)),
						sql`${jobs.exposedAt} asc nulls last`,
						sql`${jobs.promisedAt} asc nulls last`,
						asc(jobs.number)
					];
		case 'promisedAt':
			return [
				query.dir === 'asc'
					? sql`${jobs.promisedAt} asc nulls last`
					: sql`${jobs.promisedAt} desc nulls last`,
				byNumber
			];
		case 'number':
			return [d(jobs.number)];
		case 'customer':
			return [d(sql`lower(${customers.name})`), byNumber];
		case 'model':
			return [d(sql`lower(${jobs.maker})`), d(sql`lower(${jobs.model})`), byNumber];
		case 'status':
			return [d(statusOrder), byNumber];
		case 'updatedAt':
			return [d(jobs.updatedAt), byNumber];
		default:
			return [d(jobs.createdAt), d(jobs.number)];
	}
}

/** One page of jobs, searched, filtered and sorted in the database. */
export async function list(query: JobListQuery, now = new Date()): Promise<JobList> {
	const db = await getDb();
	const where = and(
		query.urgency ? and(isOpenSql, sql`${urgencyRankSql(now)} >= ${urgencyRank[query.urgency]}`) : undefined,
		query.overdue ? overdueSql(now) : undefined,
		searchCondition(query.q),
		query.status ? eq(jobs.status, query.status) : undefined,
		query.technician === 'none'
			? isNull(jobs.technicianId)
			: query.technician
				? eq(jobs.technicianId, query.technician)
				: undefined
	);
	const [{ total }] = await db
		.select({ total: sql<number>`count(*)::int` })
		.from(jobs)
		.innerJoin(customers, eq(customers.id, jobs.customerId))
		.where(where);
	const pages = Math.max(1, Math.ceil(total / query.size));
	const page = Math.min(query.page, pages);
	const rows = await db
		.select(listColumns)
		.from(jobs)
		.innerJoin(customers, eq(customers.id, jobs.customerId))
		.leftJoin(technician, eq(technician.id, jobs.technicianId))
		.where(where)
		.orderBy(...orderFor(query, now))
		.limit(query.size)
		.offset((page - 1) * query.size);
	return { rows: rows as JobListRow[], total, page, size: query.size, pages };
}

export type JobHistoryEntry = {
	id: number;
	fromStatus: JobStatus | null;
	toStatus: JobStatus;
	byName: string | null;
	at: Date;
	note: string;
};

export type JobDetail = Job & {
	customer: { id: string; name: string; email: string | null; phone: string | null };
	technicianName: string | null;
	createdByName: string | null;
	/** Who recorded what became of the data (src/lib/server/jobs/data-outcome.ts). */
	dataRecordedByName: string | null;
	history: JobHistoryEntry[];
	next: readonly JobStatus[];
};

/** One job with its customer and status history, or undefined. */
export async function get(id: string): Promise<JobDetail | undefined> {
	if (!isUuid(id)) return undefined;
	const db = await getDb();
	const creator = alias(users, 'creator');
	const dataRecorder = alias(users, 'data_recorder');
	const [row] = await db
		.select({
			job: jobs,
			customer: { id: customers.id, name: customers.name, email: customers.email, phone: customers.phone },
			technicianName: technician.name,
			createdByName: creator.name,
			dataRecordedByName: dataRecorder.name
		})
		.from(jobs)
		.innerJoin(customers, eq(customers.id, jobs.customerId))
		.leftJoin(technician, eq(technician.id, jobs.technicianId))
		.leftJoin(creator, eq(creator.id, jobs.createdBy))
		.leftJoin(dataRecorder, eq(dataRecorder.id, jobs.dataRecordedBy))
		.where(eq(jobs.id, id));
	if (!row) return undefined;
	const history = await db
		.select({
			id: jobEvents.id,
			fromStatus: jobEvents.fromStatus,
			toStatus: jobEvents.toStatus,
			byName: users.name,
			at: jobEvents.at,
			note: jobEvents.note
		})
		.from(jobEvents)
		.leftJoin(users, eq(users.id, jobEvents.by))
		.where(eq(jobEvents.jobId, id))
		.orderBy(asc(jobEvents.at), asc(jobEvents.id));
	return {
		...row.job,
		customer: row.customer,
		technicianName: row.technicianName,
		createdByName: row.createdByName,
		dataRecordedByName: row.dataRecordedByName,
		history,
		next: nextStatuses(row.job.status)
	};
}

/** Locks the job row for the rest of the transaction (runs use it too). */
export async function lockJob(tx: Tx, id: string): Promise<Job> {
	const [job] = isUuid(id) ? await tx.select().from(jobs).where(eq(jobs.id, id)).for('update') : [];
	if (!job) throw new RuleError(404, 'not-found', 'No job with this id.');
	return job;
}

/**
 * Moves a job to another status if the workflow allows it, with a history row and an audit record.
 * Pass `tx` to make the change part of a larger transaction (a run reaching its verdict, say).
 */
export async function transition(
	jobId: string,
	to: JobStatus,
	actorId: string | null,
	note = '',
	tx?: Tx
): Promise<Job> {
	const work = async (t: Tx) => {
		const job = await lockJob(t, jobId);
		if (!canTransition(job.status, to)) {
			const allowed = nextStatuses(job.status);
			throw new RuleError(
				409,
				'invalid-transition',
				`A job that is “${statusLabels[job.status]}” cannot move to “${statusLabels[to] ?? to}”. ${
					allowed.length
						? `It can move to: ${allowed.map((s) => statusLabels[s]).join(', ')}.`
						: 'It is closed.'
				}`,
				{ field: 'status' }
			);
		}
		// The ready gate (checklists/gate.ts): a repaired phone leaves tested, or with reasons.
		if (to === 'ready' && job.status === 'testing') {
			const held = await readyGate(t, job, note);
			if (held) throw new RuleError(409, 'untested', held, { field: 'status' });
		}
		const [updated] = await t
			.update(jobs)
			.set({ status: to, updatedAt: new Date() })
			.where(eq(jobs.id, jobId))
			.returning();
		await t
			.insert(jobEvents)
			.values({ jobId, fromStatus: job.status, toStatus: to, by: actorId, note: note.trim() });
		await record(t, {
			actorId,
			action: 'job.status',
			targetType: 'job',
			targetId: jobId,
			details: { from: job.status, to, ...(note.trim() ? { note: note.trim() } : {}) }
		});
		// Customer side: "ready to collect" is queued with the move, in this transaction
		// (src/lib/server/reports/customer.ts; imported lazily, it imports this module).
		if (to === 'ready') await (await import('$lib/server/reports/customer')).queueReadyToCollect(t, updated);
		return updated;
	};
	return tx ? work(tx) : (await getDb()).transaction(work);
}

/** Assigns (or, with null, unassigns) the technician; only active staff can be assigned. */
export async function assignTechnician(
	jobId: string,
	technicianId: string | null,
	actorId: string | null
): Promise<Job> {
	const db = await getDb();
	return db.transaction(async (tx) => {
		const job = await lockJob(tx, jobId);
		if (technicianId) {
			const [member] = await tx
				.select({ id: users.id })
				.from(users)
				.where(and(eq(users.id, technicianId), eq(users.disabled, false)));
			if (!member)
				throw new RuleError(400, 'not-a-technician', 'Choose an active staff member.', {
					field: 'technicianId'
				});
		}
		if (job.technicianId === technicianId) return job;
		const [updated] = await tx
			.update(jobs)
			.set({ technicianId, updatedAt: new Date() })
			.where(eq(jobs.id, jobId))
			.returning();
		await record(tx, {
			actorId,
			action: 'job.assign',
			targetType: 'job',
			targetId: jobId,
			details: { from: job.technicianId, to: technicianId }
		});
		return updated;
	});
}

/** Records the customer's consent to open the phone, given after intake. It is never withdrawn here. */
export async function recordConsent(jobId: string, actorId: string | null): Promise<Job> {
	const db = await getDb();
	return db.transaction(async (tx) => {
		const job = await lockJob(tx, jobId);
		if (job.consentToOpen) return job;
		const [updated] = await tx
			.update(jobs)
			.set({ consentToOpen: true, consentAt: new Date(), updatedAt: new Date() })
			.where(eq(jobs.id, jobId))
			.returning();
		await record(tx, { actorId, action: 'job.consent', targetType: 'job', targetId: jobId });
		return updated;
	});
}

/** Staff who can be given a job, for the filter and the assignment menu. */
export async function assignableStaff() {
	const db = await getDb();
	return db
		.select({ id: users.id, name: users.name, role: users.role })
		.from(users)
		.where(eq(users.disabled, false))
		.orderBy(asc(users.name));
}

export async function count() {
	const db = await getDb();
	const [{ n }] = await db.select({ n: sql<number>`count(*)::int` }).from(jobs);
	return n;
}
