// Over 300 lines on purpose: a spec: the insights API against hand-computed fixtures.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { getDb } from '$lib/server/db';
import { runs as runsTable, runSteps, type StepAnswer } from '$lib/server/db/schema/runs';
import { insightRunFacts } from '$lib/server/db/schema/insights';
import { imeiCheckDigit } from '$lib/domain/identifiers';
import { wilsonInterval } from '$lib/domain/stats';
import * as staff from '$lib/server/staff/queries';
import * as jobs from '$lib/server/jobs/queries';
import * as library from '$lib/server/flows/queries';
import { makeJobIntake } from '$lib/schemas/job';
import type { FilterValues } from '$lib/insights/types';
import { recordConfirmation, rebuildFacts } from './facts';
import { factStore, labels as loadLabels } from './store';
import * as aggregate from './aggregate';
import * as insights from './queries';

// Real in-memory PGlite migrated from drizzle/. Fixture: eight runs of the shipped restart-loop flow
// (two published versions), written straight into runs/run_steps with chosen times so that every
// expected figure below can be worked out by hand. All names and devices are invented.
const FLOW = 'restart-loop-after-liquid';
const flowFile = `${FLOW}.flow.yaml`;
const tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-insights-'));
const imei = (body14: string) => `${body14}${imeiCheckDigit(body14)}`;
const MIN = 60_000;

let techA: { id: string };
let techB: { id: string };
let lead: { id: string };
const runIds: Record<string, string> = {};

type StepSpec = { step: string; outcome: number; seconds: number; superseded?: boolean; back?: boolean };

async function makeJob(model: string, n: number) {
	return jobs.create(
		null,
		makeJobIntake().parse({
			customerName: `Fixture Customer ${n}`,
			customerPhone: '+00 555 0100',
			maker: 'Corvana',
			model,
			imei: imei(`0066000000000${n}`),
			symptoms: ['restart-loop'],
			liquid: 'salt',
			submerged: false,
			passcodeStatus: 'given',
			consentToOpen: true
		})
	);
}

async function addRun(spec: {
	name: string;
	jobId: string;
	versionId: string;
	tech: { id: string };
	start: string;
	minutes: number;
	verdict?: string;
	abandon?: { reason: string; step: string };
	inProgress?: boolean;
	steps: StepSpec[];
}) {
	const db = await getDb();
	const startedAt = new Date(spec.start);
	const finishedAt = new Date(startedAt.getTime() + spec.minutes * MIN);
	const status = spec.inProgress ? 'in-progress' : spec.verdict ? 'completed' : 'abandoned';
	const [run] = await db
		.insert(runsTable)
		.values({
			jobId: spec.jobId,
			flowVersionId: spec.versionId,
			technicianId: spec.tech.id,
			snapshot: {},
			currentStep: spec.verdict ?? spec.abandon?.step ?? 'power-on-as-received',
			status,
			verdictCode: spec.verdict ?? null,
			verdictStep: spec.verdict ?? null,
			abandonReason: spec.abandon?.reason ?? null,
			startedAt,
			finishedAt: spec.inProgress ? null : finishedAt,
			updatedAt: finishedAt
		})
		.returning();
	let t = startedAt.getTime();
	for (const [i, s] of spec.steps.entries()) {
		const answer: StepAnswer = s.back
			? { back: { revised: i } }
			: { outcome: { index: s.outcome, label: `outcome ${s.outcome}` } };
		await db.insert(runSteps).values({
			runId: run.id,
			seq: i + 1,
			stepId: s.step,
			kind: s.back ? 'back' : 'symptom',
			answer,
			enteredAt: new Date(t),
			answeredAt: new Date(t + s.seconds * 1000),
			supersededAt: s.superseded ? new Date(t + s.seconds * 1000 + 1) : null,
			idempotencyKey: `${spec.name}-${i}`,
			result: {}
		});
		t += s.seconds * 1000;
	}
	runIds[spec.name] = run.id;
}

const P = 'power-on-as-received';
const O = 'open-and-disconnect';

beforeAll(async () => {
	techA = await staff.create(null, {
		name: 'Wren Ashdown',
		email: 'wren@shop.test',
		role: 'technician',
		password: 'tech-password-1'
	});
	techB = await staff.create(null, {
		name: 'Odile Marsh',
		email: 'odile@shop.test',
		role: 'technician',
		password: 'tech-password-2'
	});
	lead = await staff.create(null, {
		name: 'Piet Hollow',
		email: 'piet@shop.test',
		role: 'lead',
		password: 'lead-password-1'
	});
	const shipped = fs.readFileSync(path.resolve('flows', flowFile), 'utf8');
	fs.writeFileSync(path.join(tmp, flowFile), shipped);
	await library.importFromFiles(tmp);
	// A changed file is published as the next version.
	fs.writeFileSync(path.join(tmp, flowFile), shipped.replace(/^summary: >-\n/m, 'summary: >-\n  Revised.\n'));
	await library.importFromFiles(tmp);
	const v1 = (await library.getVersion(FLOW, 1))!.id;
	const v2 = (await library.getVersion(FLOW, 2))!.id;
	const j1 = await makeJob('Tern 5', 1);
	const j2 = await makeJob('Tern 5', 2);
	const j3 = await makeJob('Tern 6', 3);
	const j4 = await makeJob('Tern 5', 4);
	const j5 = await makeJob('Tern 6', 5);
	const j6 = await makeJob('Tern 6', 6);
	const j7 = await makeJob('Tern 5', 7);
	// Week of Monday 2026-03-02.
	await addRun({
		name: 'r1',
		jobId: j1.id,
		versionId: v1,
		tech: techA,
		start: '2026-03-02T10:00:00Z',
		minutes: 30,
		verdict: 'front-flex-fault',
		steps: [
			{ step: P, outcome: 0, seconds: 60 },
			{ step: O, outcome: 1, seconds: 600 }
		]
	});
	// A revised answer and its BACK are left out of the path: open-and-disconnect counts 900 s.
	await addRun({
		name: 'r2',
		jobId: j2.id,
		versionId: v1,
		tech: techA,
		start: '2026-03-03T10:00:00Z',
		minutes: 40,
		verdict: 'front-flex-fault',
		steps: [
			{ step: P, outcome: 0, seconds: 120 },
			{ step: O, outcome: 0, seconds: 300, superseded: true },
			{ step: O, outcome: 0, seconds: 100, back: true },
			{ step: O, outcome: 1, seconds: 900 }
		]
	});
	// Second run of job 2 (jobs per week count distinct jobs).
	await addRun({
		name: 'r3',
		jobId: j2.id,
		versionId: v1,
		tech: techB,
		start: '2026-03-04T10:00:00Z',
		minutes: 90,
		verdict: 'board-fault',
		steps: [
			{ step: P, outcome: 1, seconds: 180 },
			{ step: O, outcome: 1, seconds: 1200 }
		]
	});
	// Week of 2026-03-09.
	await addRun({
		name: 'r4',
		jobId: j4.id,
		versionId: v1,
		tech: techB,
		start: '2026-03-10T10:00:00Z',
		minutes: 10,
		abandon: { reason: 'Customer collected the phone', step: O },
		steps: [{ step: P, outcome: 0, seconds: 240 }]
	});
	await addRun({
		name: 'r5',
		jobId: j5.id,
		versionId: v2,
		tech: techA,
		start: '2026-03-11T10:00:00Z',
		minutes: 20,
		verdict: 'front-flex-fault',
		steps: [{ step: P, outcome: 0, seconds: 30 }]
	});
	await addRun({
		name: 'r6',
		jobId: j6.id,
		versionId: v2,
		tech: techB,
		start: '2026-03-12T10:00:00Z',
		minutes: 5,
		verdict: 'no-restart-on-bench',
		steps: [{ step: P, outcome: 2, seconds: 90 }]
	});
	// Week of 2026-03-16; the reason differs in case and spacing only.
	await addRun({
		name: 'r7',
		jobId: j7.id,
		versionId: v2,
		tech: techA,
		start: '2026-03-20T10:00:00Z',
		minutes: 15,
		abandon: { reason: ' customer  collected the phone', step: P },
		steps: [{ step: P, outcome: 0, seconds: 60 }]
	});
	await addRun({
		name: 'r8',
		jobId: j3.id,
		versionId: v2,
		tech: techA,
		start: '2026-03-20T11:00:00Z',
		minutes: 15,
		inProgress: true,
		steps: [{ step: P, outcome: 0, seconds: 60 }]
	});
	expect(await rebuildFacts(await getDb(), { batch: 3 })).toBe(7);
	const db = await getDb();
	await recordConfirmation(db, { runId: runIds.r1, confirmed: true, by: lead.id });
	await recordConfirmation(db, {
		runId: runIds.r2,
		confirmed: false,
		note: 'Flex fine; connector corroded',
		by: lead.id,
		at: new Date('2026-03-06T09:00:00Z')
	});
	await recordConfirmation(db, { runId: runIds.r3, confirmed: true, by: lead.id });
	await recordConfirmation(db, { runId: runIds.r5, confirmed: true, by: lead.id });
});

afterAll(() => fs.rmSync(tmp, { recursive: true, force: true }));

async function facts() {
	const db = await getDb();
	await factStore().sync(db);
	return { facts: [...factStore().facts()], labels: await loadLabels(db) };
}

const all: FilterValues = {};

describe('facts', () => {
	it('keeps one row per finished run with the path that still counts', async () => {
		const db = await getDb();
		const rows = await db.select().from(insightRunFacts);
		expect(rows).toHaveLength(7); // r8 is still in progress
		const r2 = rows.find((r) => r.runId === runIds.r2)!;
		expect(r2.stepIds).toEqual([P, O]);
		expect(r2.outcomes).toEqual([0, 1]);
		expect(r2.dwellS).toEqual([120, 900]);
		expect(r2.durationS).toBe(40 * 60);
		expect(r2.deviceModel).toBe('Corvana Tern 5');
		expect(r2.confirmed).toBe(false);
		expect(r2.confirmationNote).toBe('Flex fine; connector corroded');
		const r4 = rows.find((r) => r.runId === runIds.r4)!;
		expect([r4.status, r4.abandonStep, r4.verdictCode]).toEqual(['abandoned', O, null]);
	});

	it('a rebuild writes the same facts again and readers pick up the newer rows', async () => {
		const before = (await facts()).facts.map((f) => ({ ...f, seq: 0 }));
		const seq = factStore().lastSeq;
		await rebuildFacts(await getDb());
		const after = (await facts()).facts.map((f) => ({ ...f, seq: 0 }));
		expect(factStore().lastSeq).toBeGreaterThan(seq);
		expect(after).toEqual(before);
	});
});

describe('verdict frequency', () => {
	it('counts, shares and Wilson intervals per flow (hand-computed)', async () => {
		const { facts: f, labels } = await facts();
		const { rows, completed } = aggregate.verdicts(f, all, labels);
		expect(completed).toBe(5); // r1 r2 r3 r5 r6
		expect(rows.map((r) => [r.verdictCode, r.count, r.runs, r.version])).toEqual([
			['front-flex-fault', 3, 5, null],
			['board-fault', 1, 5, null],
			['no-restart-on-bench', 1, 5, null]
		]);
		const top = rows[0];
		expect(top.share).toBe(0.6);
		// Wilson 95 % for 3/5 worked by hand with z = 1.959964: (9.841459 ± 5.761581) / 17.682918.
		expect(top.lower).toBeCloseTo(0.2307, 4);
		expect(top.upper).toBeCloseTo(0.8824, 4);
		expect(rows[0].flowTitle).toMatch(/restart/i);
	});

	it('filters by technician, device model, version and dates', async () => {
		const { facts: f, labels } = await facts();
		const codes = (filter: FilterValues) =>
			aggregate.verdicts(f, filter, labels).rows.map((r) => `${r.verdictCode}:${r.count}/${r.runs}`);
		expect(codes({ technician: techA.id })).toEqual(['front-flex-fault:3/3']);
		expect(codes({ model: 'Corvana Tern 6' })).toEqual(['front-flex-fault:1/2', 'no-restart-on-bench:1/2']);
		const v2 = aggregate.verdicts(f, { version: 2 }, labels).rows;
		expect(v2.map((r) => [r.version, r.verdictCode, r.count])).toEqual([
			[2, 'front-flex-fault', 1],
			[2, 'no-restart-on-bench', 1]
		]);
		// `to` is inclusive: the 2026-03-04 run counts, the 2026-03-10 abandoned run is outside.
		expect(codes({ from: '2026-03-03', to: '2026-03-04' })).toEqual([
			'board-fault:1/2',
			'front-flex-fault:1/2'
		]);
		expect(codes({ flow: 'no-such-flow' })).toEqual([]);
	});
});

describe('weekly trend', () => {
	it('counts runs, distinct jobs, abandoned runs and verdicts per ISO week', async () => {
		const { facts: f } = await facts();
		const { weeks, verdictCodes } = aggregate.trend(f, all);
		expect(verdictCodes).toEqual(['front-flex-fault', 'board-fault', 'no-restart-on-bench']);
		expect(weeks.map((w) => [w.week, w.runs, w.jobs, w.abandoned])).toEqual([
			['2026-03-02', 3, 2, 0],
			['2026-03-09', 3, 3, 1],
			['2026-03-16', 1, 1, 1]
		]);
		expect(weeks[0].verdicts).toEqual({ 'front-flex-fault': 2, 'board-fault': 1, 'no-restart-on-bench': 0 });
	});

	it('keeps empty weeks inside the chosen dates', async () => {
		const { facts: f } = await facts();
		const { weeks } = aggregate.trend(f, { from: '2026-02-23', to: '2026-03-08' });
		expect(weeks.map((w) => [w.week, w.runs])).toEqual([
			['2026-02-23', 0],
			['2026-03-02', 3]
		]);
	});

	it('starts weeks on Monday (UTC)', () => {
		// 2026-03-08 is a Sunday, 2026-03-09 a Monday (calendar).
		expect(new Date(aggregate.weekStart(Date.parse('2026-03-08T23:59:00Z'))).toISOString()).toBe(
			'2026-03-02T00:00:00.000Z'
		);
		expect(new Date(aggregate.weekStart(Date.parse('2026-03-09T00:00:00Z'))).toISOString()).toBe(
			'2026-03-09T00:00:00.000Z'
		);
	});
});

describe('durations', () => {
	it('median and p90 time to verdict per flow, and dwell per step (type-7 percentiles by hand)', async () => {
		const { facts: f, labels } = await facts();
		const d = aggregate.durations(f, all, labels);
		// Completed: 5, 20, 30, 40, 90 min → median 30; p90 at h = 3.6: 40 + 0.6·50 = 70.
		expect(d.flows).toEqual([
			expect.objectContaining({ flowId: FLOW, runs: 5, medianMinutes: 30, p90Minutes: 70 })
		]);
		// open-and-disconnect: 600, 900, 1200 s → median 15 min; p90 at h = 1.8: 900 + 0.8·300 = 1140 s = 19 min.
		// power-on: 30 60 60 90 120 180 240 s → median 1.5 min; p90 at h = 5.4: 180 + 0.4·60 = 204 s = 3.4 min.
		expect(d.steps.map((s) => [s.stepId, s.answers, s.medianMinutes, s.p90Minutes])).toEqual([
			[O, 3, 15, 19],
			[P, 7, 1.5, 3.4]
		]);
	});
});

describe('abandoned runs', () => {
	it('groups reasons case- and space-insensitively and names the steps', async () => {
		const { facts: f, labels } = await facts();
		const a = aggregate.abandoned(f, all, labels);
		expect([a.finished, a.abandoned]).toEqual([7, 2]);
		expect(a.reasons).toEqual([
			expect.objectContaining({
				reason: expect.stringMatching(/^customer collected the phone$/i),
				count: 2,
				share: 1
			})
		]);
		expect(a.steps.map((s) => [s.stepId, s.count])).toEqual(
			expect.arrayContaining([
				[O, 1],
				[P, 1]
			])
		);
		expect(aggregate.abandoned(f, { technician: techA.id }, labels).abandoned).toBe(1);
	});
});

describe('verdict accuracy', () => {
	it('share confirmed over judged runs per verdict, with the overturned run and its note', async () => {
		const { facts: f, labels } = await facts();
		const acc = aggregate.accuracy(f, all, labels);
		const ff = acc.rows.find((r) => r.verdictCode === 'front-flex-fault')!;
		expect([ff.completed, ff.judged, ff.confirmed]).toEqual([3, 3, 2]);
		expect(ff.share).toBeCloseTo(2 / 3, 12);
		expect({ lower: ff.lower, upper: ff.upper }).toEqual(wilsonInterval(2, 3));
		// Nothing judged: no claim, the whole range.
		const nr = acc.rows.find((r) => r.verdictCode === 'no-restart-on-bench')!;
		expect([nr.judged, nr.share, nr.lower, nr.upper]).toEqual([0, 0, 0, 1]);
		expect(acc.overturned).toEqual([
			expect.objectContaining({
				runId: runIds.r2,
				verdictCode: 'front-flex-fault',
				note: 'Flex fine; connector corroded',
				technicianName: 'Wren Ashdown',
				at: '2026-03-06T09:00:00.000Z'
			})
		]);
	});

	it('a later confirmation replaces the earlier judgement', async () => {
		const db = await getDb();
		await recordConfirmation(db, {
			runId: runIds.r3,
			confirmed: false,
			note: 'Board fine after a second clean',
			by: lead.id
		});
		const { facts: f, labels } = await facts();
		const bf = aggregate.accuracy(f, all, labels).rows.find((r) => r.verdictCode === 'board-fault')!;
		expect([bf.judged, bf.confirmed]).toEqual([1, 0]);
		await recordConfirmation(db, { runId: runIds.r3, confirmed: true, by: lead.id });
		const again = aggregate
			.accuracy((await facts()).facts, all, labels)
			.rows.find((r) => r.verdictCode === 'board-fault')!;
		expect(again.confirmed).toBe(1);
	});
});

describe('past runs from a step', () => {
	it('shows verdicts from 5 completed runs through the step on, across versions', async () => {
		const h = await insights.stepHistory(FLOW, P);
		expect(h.runs).toBe(5);
		expect(h.verdicts.map((v) => [v.verdictCode, v.count])).toEqual([
			['front-flex-fault', 3],
			['board-fault', 1],
			['no-restart-on-bench', 1]
		]);
		expect(h.verdicts[0].lower).toBeCloseTo(0.2307, 4);
		// No shipped step of this flow branches into two different tests.
		expect(h.suggestion).toBeNull();
	});

	it('shows nothing below 5 runs', async () => {
		const h = await insights.stepHistory(FLOW, O);
		expect([h.runs, h.verdicts]).toEqual([3, []]);
	});

	it('options list only what occurs in the history', async () => {
		const o = await insights.options();
		expect(o.flows).toEqual([expect.objectContaining({ id: FLOW, versions: [1, 2] })]);
		expect(o.models).toEqual(['Corvana Tern 5', 'Corvana Tern 6']);
		expect(o.technicians.map((t) => t.name)).toEqual(['Odile Marsh', 'Wren Ashdown']);
		expect([o.first, o.last]).toEqual(['2026-03-02', '2026-03-20']);
	});
});
