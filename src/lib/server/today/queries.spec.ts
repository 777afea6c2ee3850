import { beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { getDb } from '$lib/server/db';
import { jobs as jobsTable } from '$lib/server/db/schema/jobs';
import { quotes as quotesTable } from '$lib/server/db/schema/quotes';
import { outgoingMail } from '$lib/server/db/schema/mail';
import { flowVersions } from '$lib/server/db/schema/flows';
import { verdictConfirmations } from '$lib/server/db/schema/insights';
import { imeiCheckDigit } from '$lib/domain/identifiers';
import { person, type TestPerson } from '$lib/server/staff/fixtures';
import * as library from '$lib/server/flows/queries';
import * as authoring from '$lib/server/flows/authoring';
import * as jobs from '$lib/server/jobs/queries';
import * as runs from '$lib/server/runs/queries';
import { recordEvent } from '$lib/server/runs/commit';
import * as quotes from '$lib/server/quotes/queries';
import { toCleanAndDry } from '$lib/server/runs/walks';
import { makeJobIntake, type JobIntake } from '$lib/schemas/job';
import * as today from './queries';
import * as shop from './lead';

// Fixtures with known answers on a real in-memory PGlite: every expected list below is written out
// by hand from the rows made here. The clock is passed in (`now`), so urgency and overdue are fixed.
const HOUR = 3_600_000;
const now = new Date(Date.now());
const hoursAgo = (h: number) => new Date(now.getTime() - h * HOUR);
let n = 0;
const imei = () => {
	const body = `0013${String(++n).padStart(10, '0')}`;
	return `${body}${imeiCheckDigit(body)}`;
};

let tech: TestPerson, other: TestPerson, senior: TestPerson, senior2: TestPerson, lead: TestPerson;

/** A job taken in by the lead, with the liquid, hours since contact, technician and status given. */
async function job(
	name: string,
	o: {
		liquid?: JobIntake['liquid'];
		hours?: number | null;
		to?: TestPerson | null;
		status?: (typeof jobsTable.$inferSelect)['status'];
		promised?: Date | null;
		createdAt?: Date;
	} = {}
) {
	const created = await jobs.create(
		lead.id,
		makeJobIntake().parse({
			customerName: name,
			customerEmail: `${name.split(' ')[0].toLowerCase()}@example.test`,
			maker: 'Corvana',
			model: 'Tern 6',
			imei: imei(),
			symptoms: ['restart-loop'],
			liquid: o.liquid ?? 'fresh',
			submerged: false,
			passcodeStatus: 'given',
			consentToOpen: true
		})
	);
	const db = await getDb();
	await db
		.update(jobsTable)
		.set({
			exposedAt: o.hours === null ? null : hoursAgo(o.hours ?? 1),
			technicianId: o.to?.id ?? null,
			promisedAt: o.promised === undefined ? new Date(now.getTime() + 72 * HOUR) : o.promised,
			...(o.status ? { status: o.status } : {}),
			...(o.createdAt ? { createdAt: o.createdAt } : {})
		})
		.where(eq(jobsTable.id, created.id));
	return created.id;
}

const ids = {} as Record<string, string>;

beforeAll(async () => {
	[tech, other, senior, senior2, lead] = await Promise.all([
		person('Brannoc', 'technician', 'today.test'),
		person('Ysmay', 'technician', 'today.test'),
		person('Corisande', 'senior', 'today.test'),
		person('Fennick', 'senior', 'today.test'),
		person('Haldis', 'lead', 'today.test')
	]);
	await library.importFromFiles();

	// The technician's own open jobs: levels by urgencyHint (common practice, no published source).
	ids.freshOld = await job('Aldous Penhallow', { liquid: 'fresh', hours: 80, to: tech }); // 0+3 critical
	ids.saltNew = await job('Berenike Trask', { liquid: 'salt', hours: 2, to: tech }); // 2+0 high
	ids.freshNew = await job('Caspian Wolde', { liquid: 'fresh', hours: 2, to: tech }); // 0+0 low
	ids.repairing = await job('Delphine Orrery', { status: 'repairing', to: tech });
	ids.testing = await job('Emrys Vantongeren', { status: 'testing', to: tech });
	ids.approved = await job('Faustina Greal', { status: 'awaiting-approval', to: tech });
	ids.sentQuote = await job('Gideon Harrowgate', { status: 'awaiting-approval', to: tech });
	ids.othersJob = await job('Honora Blyth', { to: other });
	ids.readyMine = await job('Isolde Fairchild', { status: 'ready', to: tech });
	// Up for grabs: received or diagnosing with nobody on it.
	ids.freeSugary = await job('Jory Ellwand', { liquid: 'sugary', hours: 30 }); // 2+2 critical
	ids.freeFresh = await job('Kerensa Mab', { liquid: 'fresh', hours: 1 }); // low
	ids.freeClosed = await job('Lowenna Tresize', { status: 'cancelled' });

	for (const [id, status, at] of [
		[ids.approved, 'approved', hoursAgo(10)],
		[ids.sentQuote, 'sent', hoursAgo(60)]
	] as const) {
		await quotes.save(lead.id, id, {
			lines: [{ description: 'Repair', kind: 'labour', quantity: 1, unitMinor: 5000 }]
		});
		const db = await getDb();
		await db
			.update(quotesTable)
			.set({ status, sentAt: at, ...(status === 'approved' ? { approvedAt: at, approvedName: 'X Y' } : {}) })
			.where(eq(quotesTable.jobId, id));
	}

	// A run under way, four answers into the restart-loop flow (runs/walks.ts).
	const runJob = await job('Merryn Polglase', { to: tech, status: 'received' });
	const run = await runs.start(runJob, 'restart-loop-after-liquid', tech);
	ids.runJob = runJob;
	ids.run = run.id;
	for (const [i, [stepId, outcome]] of toCleanAndDry.slice(0, 4).entries())
		await recordEvent(run.id, { type: 'ANSWER', stepId, outcome, idempotencyKey: `today-spec-${i}` }, tech);
});

describe('technician', () => {
	it('lists my runs under way with the step they stand on', async () => {
		const list = await today.runsInProgress(tech.id);
		expect(list.map((r) => r.id)).toEqual([ids.run]);
		// The fifth step of the walk is where four answers leave the run.
		expect(list[0].stepTitle).not.toBe(toCleanAndDry[4][0]);
		expect(list[0].stepTitle.length).toBeGreaterThan(3);
		expect(await today.runsInProgress(other.id)).toEqual([]);
	});

	it('puts my jobs in urgency order, and the ones whose next step is mine apart', async () => {
		const { queue, waiting } = await today.myJobs(tech.id, now);
		// Open, mine, not waiting: critical fresh 80 h · high salt 2 h · low fresh 2 h · then the sent
		// quote's job and the run's job, both low at 1 h with the same promise: the older job first.
		expect(queue.map((j) => j.id)).toEqual([
			ids.freshOld,
			ids.saltNew,
			ids.freshNew,
			ids.sentQuote,
			ids.runJob
		]);
		expect(waiting.map((j) => [j.id, j.next]).sort()).toEqual(
			[
				[ids.approved, 'repair'],
				[ids.repairing, 'repair'],
				[ids.testing, 'function-test']
			].sort()
		);
		expect(queue.concat(waiting).map((j) => j.id)).not.toContain(ids.readyMine);
	});

	it('offers unassigned open jobs, most urgent first, and lets me take one once', async () => {
		const before = await today.unassigned(now, 10);
		const mine = before.rows.map((r) => r.id).filter((id) => [ids.freeSugary, ids.freeFresh].includes(id));
		expect(mine).toEqual([ids.freeSugary, ids.freeFresh]);
		expect(before.rows.map((r) => r.id)).not.toContain(ids.freeClosed);

		await today.take(ids.freeFresh, tech.id);
		await expect(today.take(ids.freeFresh, other.id)).rejects.toThrow(/Brannoc took this job first/);
		const after = await today.unassigned(now, 10);
		expect(after.total).toBe(before.total - 1);
		expect((await today.myJobs(tech.id, now)).queue.map((j) => j.id)).toContain(ids.freeFresh);
	});
});

describe('senior', () => {
	let seniorsDraft: string, othersDraft: string, returned: string, editedByMe: string;
	beforeAll(async () => {
		// Any three published flows: which ones does not matter to the lists.
		const db = await getDb();
		const published = await db
			.selectDistinctOn([flowVersions.flowId], { id: flowVersions.id })
			.from(flowVersions)
			.where(eq(flowVersions.status, 'published'))
			.orderBy(flowVersions.flowId);
		const [v, w, x] = published;
		seniorsDraft = (await authoring.createDraft(senior, { fromVersionId: v!.id })).id;
		await authoring.submit(senior, seniorsDraft);
		othersDraft = (await authoring.createDraft(senior2, { fromVersionId: w!.id })).id;
		await authoring.submit(senior2, othersDraft);
		// senior2 starts it, the first senior edits it: the first senior may not review it either.
		const d = await authoring.createDraft(senior2, { fromVersionId: x!.id });
		await authoring.saveDraft(senior, d.id, { revision: d.revision, definition: d.definition });
		await authoring.submit(senior2, d.id);
		editedByMe = d.id;
		returned = (await authoring.createDraft(senior, { fromVersionId: w!.id })).id;
		await authoring.submit(senior, returned);
		await authoring.sendBack(senior2, returned, 'Name the source of the drying time.');
	});

	it('lists drafts waiting for my review, never my own or one I edited', async () => {
		const mine = (await today.reviewsWaiting(senior.id)).map((d) => d.id);
		expect(mine).toEqual([othersDraft]);
		expect(mine).not.toContain(editedByMe);
		const theirs = (await today.reviewsWaiting(senior2.id)).map((d) => d.id);
		expect(theirs).toEqual([seniorsDraft]);
		expect(await today.reviewsWaitingCount(lead.id)).toBe(3);
	});

	it('lists my drafts sent back, with the reviewer’s note', async () => {
		const back = await today.sentBack(senior.id);
		expect(back).toHaveLength(1);
		expect(back[0]).toMatchObject({
			id: returned,
			note: 'Name the source of the drying time.',
			reviewerName: 'Fennick'
		});
		expect(await today.sentBack(senior2.id)).toEqual([]);
	});

	it('shows the verdicts overturned since I last looked, and remembers when I looked', async () => {
		// A finished run with three words from the repair: the newest counts.
		const runJob = await job('Nonna Carvath', { to: tech });
		const run = await runs.start(runJob, 'restart-loop-after-liquid', tech);
		const db = await getDb();
		const write = (confirmed: boolean, h: number, note = '') =>
			db
				.insert(verdictConfirmations)
				.values({ runId: run.id, confirmed, note, by: lead.id, at: hoursAgo(h) });
		await write(false, 50, 'Did not hold the first time');
		await write(true, 40);
		expect((await today.overturnedFor(senior.id, now)).total).toBe(0); // confirmed since
		await write(false, 20, 'Same fault again after a week');
		const first = await today.overturnedFor(senior.id, now);
		expect(first.seen).toBeNull();
		expect(first.rows.map((r) => [r.runId, r.note])).toEqual([[run.id, 'Same fault again after a week']]);

		await today.markSeen(senior.id, 'overturned', hoursAgo(10));
		expect((await today.overturnedFor(senior.id, now)).total).toBe(0);
		// Another senior has not looked: they still see it.
		expect((await today.overturnedFor(senior2.id, now)).total).toBe(1);
	});
});

describe('lead', () => {
	it('counts today’s intake, phones to hand back, broken promises and quotes to chase', async () => {
		const dayStart = hoursAgo(6);
		const late = await job('Ottoline Grist', { createdAt: hoursAgo(30), promised: hoursAgo(5) });
		const readyLate = await job('Peregrine Voss', { status: 'ready', promised: hoursAgo(5) });
		const intake = (await shop.intakeSince(dayStart)).map((j) => j.id);
		expect(intake).toContain(readyLate);
		expect(intake).not.toContain(late);

		const overdue = (await shop.overdue(now)).map((j) => j.id);
		expect(overdue).toEqual([late]); // the ready one kept its promise
		expect(await shop.overdueCount(now)).toBe(1);

		expect((await shop.collections(dayStart)).ready.map((j) => j.id).sort()).toEqual(
			[ids.readyMine, readyLate].sort()
		);

		// Sent 60 h ago: waiting past a 48 h threshold, not past a 72 h one; the approved one never.
		expect((await shop.quotesWaiting(now, 48)).map((q) => q.id)).toEqual([ids.sentQuote]);
		expect(await shop.quotesWaiting(now, 72)).toEqual([]);
	});

	it('lists failed e-mails, newest first', async () => {
		const db = await getDb();
		await db.insert(outgoingMail).values([
			{
				to: 'a@x.invalid',
				subject: 'Older',
				text: 't',
				template: 't',
				status: 'failed',
				lastError: '550',
				updatedAt: hoursAgo(3)
			},
			{
				to: 'b@x.invalid',
				subject: 'Newer',
				text: 't',
				template: 't',
				status: 'failed',
				lastError: '550',
				updatedAt: hoursAgo(1)
			},
			{ to: 'c@x.test', subject: 'Sent', text: 't', template: 't', status: 'sent' }
		]);
		const failed = await shop.failedMail();
		expect(failed.total).toBe(2);
		expect(failed.rows.map((m) => m.subject)).toEqual(['Newer', 'Older']);
		expect(await shop.failedMailCount()).toBe(2);
	});
});
