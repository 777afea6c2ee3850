import { beforeAll, describe, expect, it } from 'vitest';
import { eq, inArray } from 'drizzle-orm';
import { getDb } from '$lib/server/db';
import { jobs as jobsTable } from '$lib/server/db/schema/jobs';
import { imeiCheckDigit } from '$lib/domain/identifiers';
import { liquidKinds } from '$lib/domain/liquid';
import { byUrgency, urgencyAt, urgencyRank } from '$lib/domain/queue';
import { person } from '$lib/server/staff/fixtures';
import * as settings from '$lib/server/settings/queries';
import { jobListQuery, makeJobIntake, type JobIntake } from '$lib/schemas/job';
import * as jobs from './queries';
import { urgencyRankSql } from './urgency-sql';

// Real in-memory PGlite. The clock is fixed: `now` is passed to the list, so the answers are known.
const now = new Date('2026-12-04T12:00:00Z');
const hoursAgo = (h: number) => new Date(now.getTime() - h * 3_600_000);
let serial = 0;
const imei = () => {
	const body = `0012${String(++serial).padStart(10, '0')}`;
	return `${body}${imeiCheckDigit(body)}`;
};
const intake = (over: Partial<JobIntake> = {}) =>
	makeJobIntake().parse({
		customerName: 'Tamsin Ravelle',
		customerPhone: '+00 555 0101',
		maker: 'Corvana',
		model: 'Tern 6',
		imei: imei(),
		liquid: 'fresh',
		submerged: false,
		passcodeStatus: 'given',
		...over
	});

let actor: string;
beforeAll(async () => {
	actor = (await person('Odile', 'technician', 'urgency.test')).id;
});

/** A job with a chosen contact time, promise and status, written straight to the row. */
async function job(liquid: JobIntake['liquid'], hours: number | null, promised?: Date, status?: string) {
	const created = await jobs.create(actor, intake({ liquid }));
	const db = await getDb();
	await db
		.update(jobsTable)
		.set({
			exposedAt: hours === null ? null : hoursAgo(hours),
			promisedAt: promised ?? null,
			...(status ? { status: status as 'received' } : {})
		})
		.where(eq(jobsTable.id, created.id));
	return created.number;
}

describe('the urgency rule in SQL', () => {
	it('gives the same level as urgencyHint for every liquid at every wait band edge', async () => {
		const waits = [null, 0, 5.9, 6, 23.9, 24, 71.9, 72, 400];
		const made: { number: number; liquid: (typeof liquidKinds)[number]; hours: number | null }[] = [];
		for (const liquid of liquidKinds)
			for (const hours of waits) made.push({ number: await job(liquid, hours), liquid, hours });
		const db = await getDb();
		const rows = await db
			.select({ number: jobsTable.number, rank: urgencyRankSql(now) })
			.from(jobsTable)
			.where(
				inArray(
					jobsTable.number,
					made.map((m) => m.number)
				)
			);
		const rank = new Map(rows.map((r) => [r.number, Number(r.rank)]));
		for (const m of made) {
			const expected =
				urgencyRank[
					urgencyAt({ liquid: m.liquid, exposedAt: m.hours === null ? null : hoursAgo(m.hours) }, now)
				];
			expect(rank.get(m.number), `${m.liquid} after ${m.hours} h`).toBe(expected);
		}
	});
});

describe('the job list by urgency and by promise', () => {
	let numbers: Record<string, number>;
	beforeAll(async () => {
		const db = await getDb();
		await db.delete(jobsTable).where(eq(jobsTable.createdBy, actor));
		numbers = {
			// Hand-computed levels (common practice, no published source): see queue.spec.ts.
			freshLate: await job('fresh', 80, hoursAgo(-48)), // 0 + 3 = critical, promise in 2 days
			saltDay: await job('salt', 30, hoursAgo(20)), // 2 + 2 = critical, promise passed → overdue
			sugaryNew: await job('sugary', 3, hoursAgo(-24)), // 2 + 0 = high
			freshNew: await job('fresh', 2, hoursAgo(1), 'ready'), // low; ready: kept its promise
			unknown: await job('chlorinated', null, hoursAgo(2)), // 1 + 1 = high (unknown time counts as 6–24 h), overdue
			closed: await job('salt', 500, hoursAgo(200), 'collected') // critical by time, but closed
		};
	});
	const mine = (rows: { number: number }[]) =>
		rows.map((r) => r.number).filter((n) => Object.values(numbers).includes(n));

	it('sorts most urgent first, open jobs before closed ones, as byUrgency does', async () => {
		const list = await jobs.list(jobListQuery.parse({ sort: 'urgency', size: 100 }), now);
		const n = numbers;
		// Closed jobs come last, still in urgency order among themselves (collected salt 500 h is critical).
		expect(mine(list.rows)).toEqual([n.freshLate, n.saltDay, n.sugaryNew, n.unknown, n.closed, n.freshNew]);
		const open = list.rows.filter((r) => ![n.freshNew, n.closed].includes(r.number));
		expect(byUrgency(open, now).map((r) => r.number)).toEqual(mine(open));
	});

	it('filters to at least an urgency (open jobs only)', async () => {
		const list = await jobs.list(jobListQuery.parse({ urgency: 'high', sort: 'urgency', size: 100 }), now);
		expect(mine(list.rows)).toEqual([numbers.freshLate, numbers.saltDay, numbers.sugaryNew, numbers.unknown]);
	});

	it('filters to overdue: promise passed, not ready', async () => {
		const list = await jobs.list(jobListQuery.parse({ overdue: '1', sort: 'promisedAt', dir: 'asc' }), now);
		expect(mine(list.rows)).toEqual([numbers.saltDay, numbers.unknown]);
	});
});

describe('the promised date at intake', () => {
	it('defaults to the end of today plus the shop’s turnaround, in the browser’s zone', async () => {
		await settings.setWorkflow({ turnaroundDays: 5, quoteWaitHours: 48 });
		const before = new Date();
		const job = await jobs.create(actor, intake({ tzOffsetMin: 0 }));
		const day = new Date(before.getTime() + 5 * 86_400_000).toISOString().slice(0, 10);
		expect(job.promisedAt?.toISOString()).toBe(`${day}T23:59:59.000Z`);
	});

	it('keeps the day the technician chose (UTC+2: the day ends at 21:59:59 UTC)', async () => {
		const job = await jobs.create(actor, intake({ promisedDate: '2099-01-15', tzOffsetMin: -120 }));
		expect(job.promisedAt?.toISOString()).toBe('2099-01-15T21:59:59.000Z');
	});

	it('refuses a day that has passed, with words for the field', () => {
		const result = makeJobIntake().safeParse({ ...intake(), promisedDate: '2020-01-01' });
		expect(result.success).toBe(false);
		expect(result.error?.issues.find((i) => i.path[0] === 'promisedDate')?.message).toMatch(/has passed/);
	});
});
