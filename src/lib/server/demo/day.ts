// Over 300 lines on purpose: flow data, the demo shop's invented day.
/**
 * The demo shop's day, so every list on every role's Today shows something on the first visit: a
 * few jobs in every status (one past its promised date, one quote the customer sits on, one
 * approved), runs in progress, finished runs for the jobs past diagnosis, a draft in review each
 * way round, a draft sent back with a note, and a "ready to collect" e-mail to an address the
 * mail server refuses (`.invalid`: the local fake answers 550), so the Outbox has a failure.
 *
 * Everything goes through the product's own functions (jobs, runs, quotes, authoring, the mail
 * queue), and runs walk whatever the published flow allows (its compiled machine decides), never a
 * list of step ids, so a rewritten flow still seeds. Customers and devices are invented.
 */
import { eq, sql } from 'drizzle-orm';
import { getDb } from '$lib/server/db';
import { jobs as jobsTable } from '$lib/server/db/schema/jobs';
import { quotes as quotesTable } from '$lib/server/db/schema/quotes';
import { flowVersions } from '$lib/server/db/schema/flows';
import * as staff from '$lib/server/staff/queries';
import * as jobs from '$lib/server/jobs/queries';
import * as runs from '$lib/server/runs/queries';
import { recordEvent } from '$lib/server/runs/commit';
import * as quotes from '$lib/server/quotes/queries';
import * as checklists from '$lib/server/checklists/queries';
import { capabilitiesOf } from '$lib/server/jobs/device-models';
import { functionTestsFor } from '$lib/domain/functionTests';
import * as flowLibrary from '$lib/server/flows/queries';
import * as authoring from '$lib/server/flows/authoring';
import { imeiCheckDigit } from '$lib/domain/identifiers';
import { currentStep } from '$lib/flows/machine';
import type { FlowDefinition } from '$lib/flows/schema';
import { makeJobIntake, type JobIntake } from '$lib/schemas/job';
import type { JobStatus } from '$lib/domain/jobStatus';
import { demoStaff } from './seed';

const HOUR = 3_600_000;
const imei = (body14: string) => `${body14}${imeiCheckDigit(body14)}`;
const hoursAgo = (h: number) => new Date(Date.now() - h * HOUR).toISOString();

type DayJob = {
	intake: Partial<JobIntake> & Pick<JobIntake, 'customerName' | 'maker' | 'model' | 'liquid'>;
	/** Where the job stands at the end of the seed. */
	status: JobStatus;
	/** Who works on it: 'tech', 'senior' or nobody. */
	who?: 'tech' | 'senior';
	takenInHoursAgo: number;
	/** Hours from now to the promised day's end; negative: the promise has passed. */
	promisedInHours?: number;
	/** 'sent' or 'approved' quotes are backdated by this many hours. */
	quote?: { status: 'sent' | 'approved'; hoursAgo: number };
	/** A run left part-way (steps answered). */
	runInProgress?: number;
};

/** The day's jobs, with invented customers and devices ("00" IMEI bodies belong to no real phone). */
const day: DayJob[] = [
	{
		intake: {
			customerName: 'Hedda Quillfeather',
			customerEmail: 'hedda@example.test',
			maker: 'Corvana',
			model: 'Tern 6',
			imei: imei('00440401112223'),
			liquid: 'salt',
			exposedAt: hoursAgo(40),
			notes: 'Swimming bag leaked at the beach.'
		},
		status: 'diagnosing',
		who: 'tech',
		takenInHoursAgo: 30,
		promisedInHours: -6,
		runInProgress: 2
	},
	{
		intake: {
			customerName: 'Rasmus Delacourt-Finch',
			customerPhone: '+00 555 0142',
			maker: 'Halvard',
			model: 'Skerry S',
			imei: imei('00440402223334'),
			liquid: 'sugary',
			exposedAt: hoursAgo(9)
		},
		status: 'diagnosing',
		who: 'senior',
		takenInHoursAgo: 6,
		runInProgress: 1
	},
	{
		intake: {
			customerName: 'Ottilie Brackwater',
			customerEmail: 'ottilie@example.test',
			maker: 'Nomi Devices',
			model: 'Brook 3',
			imei: imei('00440403334445'),
			liquid: 'fresh',
			exposedAt: hoursAgo(70)
		},
		status: 'awaiting-approval',
		who: 'tech',
		takenInHoursAgo: 72,
		quote: { status: 'sent', hoursAgo: 60 }
	},
	{
		intake: {
			customerName: 'Lucan Merriweather-Oyelaran',
			customerEmail: 'lucan@example.test',
			maker: 'Corvana',
			model: 'Tern 5',
			imei: imei('00440404445556'),
			liquid: 'chlorinated',
			exposedAt: hoursAgo(50)
		},
		status: 'awaiting-approval',
		who: 'tech',
		takenInHoursAgo: 48,
		quote: { status: 'approved', hoursAgo: 20 }
	},
	{
		intake: {
			customerName: 'Wilhelmina Ashcombe',
			customerPhone: '+00 555 0177',
			maker: 'Halvard',
			model: 'Skerry Mini',
			imei: imei('00440405556667'),
			liquid: 'fresh',
			exposedAt: hoursAgo(30)
		},
		status: 'repairing',
		who: 'tech',
		takenInHoursAgo: 28
	},
	{
		intake: {
			customerName: 'Corentin Halloway',
			customerEmail: 'corentin@example.test',
			maker: 'Nomi Devices',
			model: 'Brook 3 Max',
			imei: imei('00440406667778'),
			liquid: 'other',
			exposedAt: hoursAgo(80)
		},
		status: 'testing',
		who: 'tech',
		takenInHoursAgo: 75
	},
	{
		intake: {
			customerName: 'Perpetua Lindqvist-Amadi',
			customerEmail: 'perpetua@example.invalid',
			maker: 'Corvana',
			model: 'Tern 6 Pro',
			imei: imei('00440407778889'),
			liquid: 'fresh',
			exposedAt: hoursAgo(100)
		},
		status: 'ready',
		who: 'senior',
		takenInHoursAgo: 96
	},
	{
		intake: {
			customerName: 'Augustin Pemberley-Roux',
			customerPhone: '+00 555 0190',
			maker: 'Halvard',
			model: 'Skerry S',
			imei: imei('00440408889990'),
			liquid: 'sugary',
			exposedAt: hoursAgo(120)
		},
		status: 'collected',
		who: 'tech',
		takenInHoursAgo: 110
	},
	{
		intake: {
			customerName: 'Evander Thistlewood',
			customerPhone: '+00 555 0168',
			maker: 'Corvana',
			model: 'Tern 5',
			imei: imei('00440410001112'),
			liquid: 'salt',
			exposedAt: hoursAgo(4),
			submerged: true,
			depthM: 1,
			minutes: 3
		},
		status: 'received',
		takenInHoursAgo: 1
	},
	{
		intake: {
			customerName: 'Solveig Marchbank',
			customerPhone: '+00 555 0123',
			maker: 'Nomi Devices',
			model: 'Brook 3',
			imei: imei('00440409990001'),
			liquid: 'unknown',
			exposedAt: ''
		},
		status: 'cancelled',
		takenInHoursAgo: 50
	}
];

/** What every job of the day shares; the intake schema fills in the rest of its defaults. */
const base = { passcodeStatus: 'given', consentToOpen: true, submerged: false } satisfies Partial<JobIntake>;

/** The chain of moves from "received" to `to` along the workflow's usual path. */
const path: JobStatus[] = [
	'received',
	'diagnosing',
	'awaiting-approval',
	'repairing',
	'testing',
	'ready',
	'collected'
];

/** Every flow's current published version, by flow id. */
async function publishedFlows(): Promise<{ id: string; def: FlowDefinition }[]> {
	const db = await getDb();
	const rows = await db
		.selectDistinctOn([flowVersions.flowId], { flowId: flowVersions.flowId })
		.from(flowVersions)
		.where(eq(flowVersions.status, 'published'))
		.orderBy(flowVersions.flowId);
	const out: { id: string; def: FlowDefinition }[] = [];
	for (const r of rows) {
		const v = await flowLibrary.currentPublished(r.flowId);
		if (v) out.push({ id: r.flowId, def: v.definition });
	}
	return out;
}

/**
 * Walks a run `steps` answers on (or to its verdict with `steps = Infinity`), choosing what the
 * compiled machine allows: to stay in progress, answers that do not end in a verdict; to finish,
 * a verdict as soon as one is offered, else the first way not yet taken.
 */
async function walkRun(runId: string, def: FlowDefinition, actor: { id: string }, steps: number) {
	const seen = new Set<string>();
	for (let i = 0; i < Math.min(steps, 60); i++) {
		const run = await runs.get(runId);
		if (!run || run.status !== 'in-progress') return;
		const here = currentStep({ value: run.currentStep }, def);
		if (!here || here.step.kind === 'verdict') return;
		seen.add(here.id);
		const finish = steps === Infinity;
		const isVerdict = (next: string) => def.steps[next]?.kind === 'verdict';
		const score = (next: string) =>
			finish ? (isVerdict(next) ? 0 : seen.has(next) ? 2 : 1) : isVerdict(next) ? 2 : seen.has(next) ? 1 : 0;
		const key = `demo-day-${runId}-${i}`;
		if (here.step.kind === 'measure') {
			const ranges = here.step.ranges ?? [];
			const best = ranges.map((r, k) => ({ k, s: score(r.next) })).sort((a, b) => a.s - b.s)[0];
			const r = ranges[best.k];
			const lo = r.min ?? here.step.domain?.min ?? 0;
			const value = r.max === undefined ? lo + 1 : lo + (r.max - lo) / 2;
			await recordEvent(runId, { type: 'MEASURE', stepId: here.id, value, idempotencyKey: key }, actor);
		} else {
			const outcomes = here.step.outcomes ?? [];
			const best = outcomes.map((o, k) => ({ k, s: score(o.next) })).sort((a, b) => a.s - b.s)[0];
			await recordEvent(
				runId,
				{ type: 'ANSWER', stepId: here.id, outcome: best.k, idempotencyKey: key },
				actor
			);
		}
	}
}

/** Seeds the day once, in the demo only, when the demo has no job of its own yet. */
export async function seedDemoDay(): Promise<number> {
	const db = await getDb();
	const [{ n }] = await db
		.select({ n: sql<number>`count(*)::int` })
		.from(jobsTable)
		.where(sql`${jobsTable.imei} like '004404%'`);
	if (n > 0) return 0;
	const [lead, senior, tech] = await Promise.all(demoStaff.map((s) => staff.findByEmail(s.email)));
	if (!lead || !senior || !tech) return 0;
	const flows = await publishedFlows();
	if (flows.length === 0) return 0;
	const people = { tech, senior };

	for (const [i, d] of day.entries()) {
		const flow = flows[i % flows.length];
		const worker = d.who ? people[d.who] : null;
		const job = await jobs.create(
			lead.id,
			makeJobIntake().parse({ ...base, symptoms: flow.def.symptoms.slice(0, 1), ...d.intake })
		);
		if (worker) await jobs.assignTechnician(job.id, worker.id, lead.id);
		const target = path.indexOf(d.status);
		if (worker && target >= 1) {
			// A run starts the diagnosis (received → diagnosing); past diagnosis it reached a verdict.
			const run = await runs.start(job.id, flow.id, worker);
			await walkRun(run.id, flow.def, worker, target >= 2 ? Infinity : (d.runInProgress ?? 1));
		}
		if (d.quote) {
			await quotes.save(lead.id, job.id, {
				lines: [
					{ description: 'Diagnosis', kind: 'fee', quantity: 1, unitMinor: 3500 },
					{ description: 'Board cleaning and repair', kind: 'labour', quantity: 1, unitMinor: 8900 }
				],
				proposal: 'Clean the board, replace the corroded part, test every function.'
			});
			await db.transaction((tx) => quotes.markSent(tx, job.id));
		}
		for (const to of path.slice(2, target + 1)) {
			const from = (await jobs.get(job.id))!.status;
			if (from === to) continue;
			if (to === 'ready' && from === 'testing') {
				// A phone goes back only after a full function test (the ready gate): every item passes.
				const tests = functionTestsFor(await capabilitiesOf(d.intake.maker, d.intake.model), 'after');
				const passed = Object.fromEntries(tests.map((t) => [t.key, { result: 'pass' as const, note: '' }]));
				await checklists.saveFunctionTest(job.id, passed, worker?.id ?? lead.id);
				continue;
			}
			await jobs.transition(job.id, to, worker?.id ?? lead.id, '');
		}
		if (d.quote?.status === 'approved') {
			const sent = await quotes.latest(job.id);
			if (sent) await quotes.decide(job.id, sent.id, 'approved', d.intake.customerName);
		}
		if (d.status === 'cancelled')
			await jobs.transition(job.id, 'cancelled', lead.id, 'Customer took it elsewhere');
		// Backdate what the day implies: taken in hours ago, promised around then, the quote sent.
		const takenIn = new Date(Date.now() - d.takenInHoursAgo * HOUR);
		await db
			.update(jobsTable)
			.set({
				createdAt: takenIn,
				promisedAt:
					d.promisedInHours === undefined
						? new Date(takenIn.getTime() + 3 * 24 * HOUR)
						: new Date(Date.now() + d.promisedInHours * HOUR)
			})
			.where(eq(jobsTable.id, job.id));
		if (d.quote)
			await db
				.update(quotesTable)
				.set({ sentAt: new Date(Date.now() - d.quote.hoursAgo * HOUR) })
				.where(eq(quotesTable.jobId, job.id));
	}

	await seedDrafts(flows, { lead, senior });
	console.log(`[demo] seeded the shop's day: ${day.length} jobs, runs in progress, drafts in review`);
	return day.length;
}

/** A draft in review each way round (the senior reviews the lead's, the lead the senior's) and one sent back. */
async function seedDrafts(
	flows: { id: string; def: FlowDefinition }[],
	who: {
		lead: { id: string; role: 'lead' | 'senior' | 'technician' };
		senior: { id: string; role: 'lead' | 'senior' | 'technician' };
	}
) {
	const draftOf = async (flowId: string, author: { id: string; role: 'lead' | 'senior' | 'technician' }) => {
		const v = await flowLibrary.currentPublished(flowId);
		return v ? authoring.createDraft(author, { fromVersionId: v.id }) : null;
	};
	// Spread over the library (first, last, second to last by id), one draft per flow.
	const [a, b, c] = [flows[0], flows.at(-1)!, flows.at(-2) ?? flows[0]];
	const leadDraft = await draftOf(a.id, who.lead);
	if (leadDraft) await authoring.submit(who.lead, leadDraft.id);
	const seniorDraft = await draftOf(b.id, who.senior);
	if (seniorDraft) await authoring.submit(who.senior, seniorDraft.id);
	const returned = await draftOf(c.id, who.senior);
	if (returned) {
		await authoring.submit(who.senior, returned.id);
		await authoring.sendBack(
			who.lead,
			returned.id,
			'Say how long to dry before the second test, and cite where the time comes from.'
		);
	}
}
