import { beforeAll, describe, expect, it } from 'vitest';
import { sql } from 'drizzle-orm';
import { getDb } from '$lib/server/db';
import { jobs as jobsTable } from '$lib/server/db/schema/jobs';
import { seedDemo, demoStaff } from '$lib/server/demo/seed';
import * as library from '$lib/server/flows/queries';
import * as staff from '$lib/server/staff/queries';
import * as today from '$lib/server/today/queries';
import * as shop from '$lib/server/today/lead';
import { jobStatuses } from '$lib/domain/jobStatus';
import { seedDemoDay } from './day';

// The demo's promise: on the first visit every list on every role's Today shows something (the
// rising verdicts and overturned verdicts come from the invented year of history, not the day).
let ids: { lead: string; senior: string; tech: string };

beforeAll(async () => {
	await seedDemo();
	await library.importFromFiles();
	expect(await seedDemoDay()).toBeGreaterThan(0);
	const [lead, senior, tech] = await Promise.all(demoStaff.map((s) => staff.findByEmail(s.email)));
	ids = { lead: lead!.id, senior: senior!.id, tech: tech!.id };
}, 60_000);

describe('the demo shop’s day', () => {
	it('keeps jobs in every status', async () => {
		const db = await getDb();
		const rows = await db.select({ status: jobsTable.status }).from(jobsTable);
		expect(new Set(rows.map((r) => r.status))).toEqual(new Set(jobStatuses));
	});

	it('gives the technician a run to resume, a queue, jobs waiting and jobs to take', async () => {
		const now = new Date();
		const [runs, mine, open] = await Promise.all([
			today.runsInProgress(ids.tech),
			today.myJobs(ids.tech, now),
			today.unassigned(now)
		]);
		expect(runs.length).toBeGreaterThan(0);
		expect(runs[0].stepTitle).toBeTruthy();
		expect(mine.queue.length).toBeGreaterThan(0);
		expect(new Set(mine.waiting.map((j) => j.next))).toEqual(new Set(['repair', 'function-test']));
		expect(open.total).toBeGreaterThan(0);
	});

	it('gives the senior a draft to review, a draft sent back and a run of their own', async () => {
		const [reviews, back, runs] = await Promise.all([
			today.reviewsWaiting(ids.senior),
			today.sentBack(ids.senior),
			today.runsInProgress(ids.senior)
		]);
		expect(reviews.length).toBeGreaterThan(0);
		expect(back).toHaveLength(1);
		expect(back[0].note).toMatch(/how long to dry/);
		expect(runs.length).toBeGreaterThan(0);
	});

	it('gives the lead intake, a phone to hand back, a broken promise, a quote to chase and a failed e-mail', async () => {
		const now = new Date();
		const dayStart = new Date(now.getTime() - 24 * 3_600_000);
		const [intake, collections, overdue, quotes, reviews] = await Promise.all([
			shop.intakeSince(dayStart),
			shop.collections(dayStart),
			shop.overdue(now),
			shop.quotesWaiting(now, 48),
			today.reviewsWaiting(ids.lead)
		]);
		expect(intake.length).toBeGreaterThan(0);
		expect(collections.ready.length).toBeGreaterThan(0);
		expect(overdue.length).toBeGreaterThan(0);
		expect(quotes).toHaveLength(1);
		expect(reviews.length).toBeGreaterThan(0);
		// The ready job's e-mail goes to an .invalid address: the mail worker (not running here) fails it.
		const db = await getDb();
		const [{ n }] = await db
			.execute<{ n: number }>(sql`select count(*)::int as n from outgoing_mail where "to" like '%.invalid'`)
			.then((r) => r.rows as { n: number }[]);
		expect(n).toBe(1);
	});

	it('seeds once', async () => {
		expect(await seedDemoDay()).toBe(0);
	});
});
