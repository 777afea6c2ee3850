// Over 300 lines on purpose: a spec: every flow-health signal against hand-computed runs.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { getDb } from '$lib/server/db';
import { runs as runsTable, runSteps, type StepAnswer } from '$lib/server/db/schema/runs';
import { imeiCheckDigit } from '$lib/domain/identifiers';
import { wilsonInterval } from '$lib/domain/stats';
import * as staff from '$lib/server/staff/queries';
import * as jobs from '$lib/server/jobs/queries';
import * as library from '$lib/server/flows/queries';
import { makeJobIntake } from '$lib/schemas/job';
import { recordConfirmation, rebuildFacts } from '$lib/server/insights/facts';
import type { StepHealth, VersionHealth } from '$lib/flow-health/types';
import * as flowHealth from './queries';
import { RevisionStore, revisionStore } from './revisions';

// Real in-memory PGlite migrated from drizzle/. Seventeen finished runs of the shipped restart-loop
// flow, version 1, written straight into runs/run_steps with chosen times, answers, BACKs, abandons
// and verdict confirmations, so every figure below is worked out by hand. Names are invented.
// Intervals are Wilson 95 %; `wilsonInterval` itself is checked against Newcombe (1998) in
// domain/stats.spec.ts, and the four-digit bounds quoted here were worked out by hand from
// Wilson's formula with z = 1.959964.
const FLOW = 'restart-loop-after-liquid';
const P = 'power-on-as-received'; // symptom
const O = 'open-and-disconnect'; // test, 15 min expected in the shipped file
const F = 'inspect-front-area'; // test
const I = 'isolate-front-flex'; // test
const D = 'front-connector-diode'; // measure
const M = 'isolate-other-modules'; // test
const C = 'clean-and-dry'; // test
const tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-flow-health-'));
const MIN = 60;

type Row = { step: string; outcome?: number; seconds: number; superseded?: boolean; backOf?: number };
let tech: { id: string };
let n = 0;

async function addRun(
	versionId: string,
	rows: Row[],
	end: { verdict?: string; abandonAt?: string; inProgressAt?: string }
): Promise<string> {
	const db = await getDb();
	const body = `0055${String(++n).padStart(10, '0')}`;
	const job = await jobs.create(
		null,
		makeJobIntake().parse({
			customerName: `Fixture Customer ${n}`,
			customerPhone: '+00 555 0100',
			maker: 'Corvana',
			model: 'Tern 5',
			imei: `${body}${imeiCheckDigit(body)}`,
			symptoms: ['restart-loop'],
			liquid: 'salt',
			submerged: false,
			passcodeStatus: 'given',
			consentToOpen: true
		})
	);
	const startedAt = new Date(Date.UTC(2026, 2, 2, 9) + n * 86_400_000);
	const total = rows.reduce((t, r) => t + r.seconds, 0);
	const finishedAt = new Date(startedAt.getTime() + total * 1000);
	const status = end.inProgressAt ? 'in-progress' : end.verdict ? 'completed' : 'abandoned';
	const [run] = await db
		.insert(runsTable)
		.values({
			jobId: job.id,
			flowVersionId: versionId,
			technicianId: tech.id,
			snapshot: {},
			currentStep: end.verdict ?? end.abandonAt ?? end.inProgressAt!,
			status,
			verdictCode: end.verdict ?? null,
			verdictStep: end.verdict ?? null,
			abandonReason: end.abandonAt ? 'Customer collected the phone' : null,
			startedAt,
			finishedAt: status === 'in-progress' ? null : finishedAt,
			updatedAt: finishedAt
		})
		.returning();
	let t = startedAt.getTime();
	for (const [i, r] of rows.entries()) {
		const back = r.backOf !== undefined;
		const answer: StepAnswer = back
			? { back: { revised: r.backOf! + 1 } }
			: { outcome: { index: r.outcome ?? 0, label: `outcome ${r.outcome ?? 0}` } };
		await db.insert(runSteps).values({
			runId: run.id,
			seq: i + 1,
			stepId: r.step,
			kind: back ? 'back' : 'test',
			answer,
			enteredAt: new Date(t),
			answeredAt: new Date(t + r.seconds * 1000),
			supersededAt: r.superseded ? new Date(t + r.seconds * 1000 + 1) : null,
			idempotencyKey: `run-${n}-${i}`,
			result: {}
		});
		t += r.seconds * 1000;
	}
	return run.id;
}

// Minutes on open-and-disconnect's standing answer, runs 1–12. Sorted: 20 25 30 35 38 40 40 42 45
// 50 60 90 → median (40 + 40) / 2 = 40; p90 at h = 11 × 0.9 = 9.9: 50 + 0.9 × (60 − 50) = 59.
const oMinutes = [30, 35, 38, 40, 40, 42, 45, 50, 20, 25, 60, 90];
const p = (outcome = 0): Row => ({ step: P, outcome, seconds: 3 * MIN });
const o = (i: number, outcome: number): Row => ({ step: O, outcome, seconds: oMinutes[i] * MIN });
// Open-and-disconnect answered "to the front area", then BACK from inspect-front-area revises it.
const oRevised = (): Row[] => [
	{ step: O, outcome: 1, seconds: 10 * MIN, superseded: true },
	{ step: F, seconds: 60, backOf: 1 }
];
const toModules = (): Row[] => [
	{ step: F, outcome: 0, seconds: 8 * MIN },
	{ step: I, outcome: 1, seconds: 6 * MIN },
	{ step: M, outcome: 1, seconds: 20 * MIN },
	{ step: C, outcome: 0, seconds: 45 * MIN }
];

const ids: string[] = [];
let v1: library.StoredVersion;

beforeAll(async () => {
	tech = await staff.create(null, {
		name: 'Isolde Varrow',
		email: 'isolde@shop.test',
		role: 'technician',
		password: 'tech-password-1'
	});
	fs.copyFileSync(path.resolve('flows', `${FLOW}.flow.yaml`), path.join(tmp, `${FLOW}.flow.yaml`));
	await library.importFromFiles(tmp);
	v1 = (await library.getVersion(FLOW, 1))!;
	const add = async (rows: Row[], end: Parameters<typeof addRun>[2]) =>
		ids.push(await addRun(v1.id, rows, end));
	// Runs 1–2: open-and-disconnect revised, then "battery out of service"; both confirmed.
	for (const i of [0, 1]) await add([p(), ...oRevised(), o(i, 0)], { verdict: 'battery-out-of-service' });
	// Runs 3–5: open-and-disconnect revised (same answer again), abandoned at inspect-front-area.
	for (const i of [2, 3, 4]) await add([p(), ...oRevised(), o(i, 1)], { abandonAt: F });
	// Run 6: isolate-front-flex answered "to the connector", revised by a BACK from the diode step.
	await add(
		[
			p(),
			o(5, 1),
			{ step: F, outcome: 0, seconds: 8 * MIN },
			{ step: I, outcome: 0, seconds: 6 * MIN, superseded: true },
			{ step: D, seconds: 30, backOf: 3 },
			{ step: I, outcome: 1, seconds: 6 * MIN },
			{ step: M, outcome: 0, seconds: 20 * MIN }
		],
		{ verdict: 'module-fault' }
	);
	// Run 7: a reading on the diode step revised, then isolate-front-flex revised: the diode step
	// was answered (and revised) but is not on the path that stands.
	await add(
		[
			p(),
			o(6, 1),
			{ step: F, outcome: 0, seconds: 8 * MIN },
			{ step: I, outcome: 0, seconds: 6 * MIN, superseded: true },
			{ step: D, outcome: 1, seconds: 6 * MIN, superseded: true },
			{ step: 'try-known-good-flex', seconds: 20, backOf: 4 },
			{ step: D, seconds: 20, backOf: 3 },
			{ step: I, outcome: 1, seconds: 6 * MIN },
			{ step: M, outcome: 0, seconds: 20 * MIN }
		],
		{ verdict: 'module-fault' }
	);
	// Runs 8–12: through clean-and-dry to "corrosion cleaned"; 8–11 overturned, 12 confirmed.
	for (const i of [7, 8, 9, 10, 11])
		await add([p(), o(i, 1), ...toModules()], { verdict: 'corrosion-cleaned' });
	// Run 13: abandoned on the first step before any answer.
	await add([], { abandonAt: P });
	// Run 14: the first answer revised; runs 14–17 end at once with "no restart on the bench".
	await add(
		[{ step: P, outcome: 0, seconds: 2 * MIN, superseded: true }, { step: O, seconds: 30, backOf: 0 }, p(2)],
		{ verdict: 'no-restart-on-bench' }
	);
	for (let i = 0; i < 3; i++) await add([p(2)], { verdict: 'no-restart-on-bench' });
	// A run still under way revises open-and-disconnect: nothing counts until it finishes.
	await addRun(v1.id, [p(), ...oRevised()], { inProgressAt: O });

	const db = await getDb();
	await rebuildFacts(db);
	// Runs 1, 2, 6, 7, 12, 14–17 confirmed; 8–11 overturned; 13 judged never (abandoned).
	for (const [i, id] of ids.entries()) {
		if (i === 2 || i === 3 || i === 4 || i === 12) continue;
		const overturned = i >= 7 && i <= 10;
		await recordConfirmation(db, {
			runId: id,
			confirmed: !overturned,
			note: overturned ? 'Board still restarted after cleaning' : '',
			by: null
		});
	}
});

afterAll(() => fs.rmSync(tmp, { recursive: true, force: true }));

const shareOf = (count: number, of: number) => ({
	count,
	of,
	share: of === 0 ? 0 : count / of,
	...wilsonInterval(count, of)
});
const stepOf = (h: VersionHealth, id: string): StepHealth => {
	const s = h.steps.find((x) => x.stepId === id);
	if (!s) throw new Error(`no step ${id}`);
	return s;
};

describe('flow health of one version, from a hand-computed history', () => {
	let h: VersionHealth;
	beforeAll(async () => {
		h = (await flowHealth.forVersion(FLOW, 1))!;
	});

	it('counts the finished runs, verdicts judged and overturned', () => {
		// 17 finished (the run under way is not); 13 completed, 4 abandoned (3, 4, 5, 13); of the 13
		// completed all are judged and 4 overturned (8–11).
		expect(h).toMatchObject({
			flowId: FLOW,
			version: 1,
			status: 'published',
			runs: 17,
			completed: 13,
			abandoned: 4,
			judged: 13,
			overturned: 4,
			flagged: 4
		});
		// Every step of the version is listed, in the authored order.
		expect(h.steps.map((s) => s.stepId).slice(0, 3)).toEqual([P, O, F]);
		expect(h.steps).toHaveLength(Object.keys(v1.definition.steps).length);
	});

	it('power-on-as-received: answered by 16, one revision, quick, one abandon, no flag', () => {
		const s = stepOf(h, P);
		const expected = v1.definition.steps[P].minutes;
		expect(expected).toBeGreaterThanOrEqual(3);
		expect(s).toMatchObject({ kind: 'symptom', expectedMinutes: expected, reached: 17, answered: 16 });
		// Answered (kept or revised) in 16 runs; revised in run 14.
		expect(s.revised).toEqual(shareOf(1, 16));
		// 16 standing answers of 3 min each: not slower than expected.
		expect(s.time).toEqual({ answers: 16, medianMinutes: 3, p90Minutes: 3 });
		// Run 13 stopped here: 1 of the 17 that reached it.
		expect(s.abandoned).toEqual(shareOf(1, 17));
		// Every judged verdict passed here: 4 of 13 — the version's own share, so not flagged.
		expect(s.overturned).toEqual(shareOf(4, 13));
		expect(s.flags).toEqual([]);
	});

	it('open-and-disconnect: revised in 5 of 12 runs and slow (median 40 min against 15)', () => {
		const s = stepOf(h, O);
		expect(v1.definition.steps[O].minutes).toBe(15);
		expect(s).toMatchObject({ kind: 'test', expectedMinutes: 15, reached: 12, answered: 12 });
		// Runs 1–5 revised it: 5/12 = 41.7 %, Wilson 95 % 0.1933–0.6805 (by hand).
		expect(s.revised).toEqual(shareOf(5, 12));
		expect(s.revised!.lower).toBeCloseTo(0.1933, 4);
		expect(s.revised!.upper).toBeCloseTo(0.6805, 4);
		// The revised answers (10 min each) are not timed; the 12 standing ones are.
		expect(s.time!.answers).toBe(12);
		expect(s.time!.medianMinutes).toBeCloseTo(40, 10);
		expect(s.time!.p90Minutes).toBeCloseTo(59, 10);
		expect(s.abandoned).toEqual(shareOf(0, 12));
		// Judged through here: runs 1, 2, 6–12 = 9, of which 4 overturned; lower end 0.1888 < 4/13.
		expect(s.overturned).toEqual(shareOf(4, 9));
		expect(s.flags).toEqual([
			{ kind: 'revised', reason: 'answers revised in 42 % of runs (5/12, 95 % 19–68 %)' },
			{ kind: 'slow', reason: 'median 40 min against 15 expected (12 answers)' }
		]);
		expect(s.links).toEqual({
			edit: `/flows/${FLOW}/drafts/new?from=1&step=${O}`,
			read: `/flows/${FLOW}/v/1#step-${O}`
		});
	});

	it('inspect-front-area: 3 of the 10 runs that reached it stopped there', () => {
		const s = stepOf(h, F);
		// Reached by runs 3–12: 7 answered (6–12), 3 stopped here (3–5).
		expect(s).toMatchObject({ reached: 10, answered: 7 });
		expect(s.revised).toEqual(shareOf(0, 7));
		expect(s.time).toEqual({ answers: 7, medianMinutes: 8, p90Minutes: 8 });
		// 3/10, Wilson 95 % 0.1078–0.6032 (by hand).
		expect(s.abandoned).toEqual(shareOf(3, 10));
		expect(s.abandoned.lower).toBeCloseTo(0.1078, 4);
		expect(s.overturned).toEqual(shareOf(4, 7));
		expect(s.flags).toEqual([
			{
				kind: 'abandoned',
				reason: '3 of 4 abandoned runs stopped here: 3 of the 10 runs that reached it (30 %, 95 % 11–60 %)'
			}
		]);
	});

	it('isolate-front-flex and the diode step: revisions below the minimum count show but do not flag', () => {
		const i = stepOf(h, I);
		expect(i).toMatchObject({ reached: 7, answered: 7 });
		// Runs 6 and 7 revised it; 7 runs is under the 10-run minimum.
		expect(i.revised).toEqual(shareOf(2, 7));
		expect(i.time).toEqual({ answers: 7, medianMinutes: 6, p90Minutes: 6 });
		expect(i.flags).toEqual([]);
		// Run 7 answered the diode step, then revised it: reached and revised, but not on its path.
		const d = stepOf(h, D);
		expect(d).toMatchObject({ kind: 'measure', reached: 1, answered: 0, time: null });
		expect(d.revised).toEqual(shareOf(1, 1));
		expect(d.overturned).toEqual(shareOf(0, 0));
		expect(d.flags).toEqual([]);
	});

	it('traces the overturned verdicts back: clean-and-dry and its verdict stand out, the shared path does not', () => {
		const c = stepOf(h, C);
		// Runs 8–12 passed here; 8–11 overturned: 4/5, Wilson lower end 0.3755 > 4/13 = 0.3077.
		expect(c).toMatchObject({ reached: 5, answered: 5 });
		expect(c.time).toEqual({ answers: 5, medianMinutes: 45, p90Minutes: 45 });
		expect(c.overturned).toEqual(shareOf(4, 5));
		expect(c.overturned.lower).toBeCloseTo(0.3755, 4);
		expect(c.flags).toEqual([
			{
				kind: 'overturned',
				reason:
					'on the path of 4 of 4 overturned verdicts: 4 of 5 judged verdicts through here were overturned (80 %, 95 % 38–96 %) against 4 of 13 (31 %) for the version'
			}
		]);
		const v = stepOf(h, 'corrosion-cleaned');
		expect(v).toMatchObject({ kind: 'verdict', reached: 5, answered: 5, revised: null, time: null });
		expect(v.overturned).toEqual(shareOf(4, 5));
		expect(v.flags).toEqual([
			{
				kind: 'overturned',
				reason:
					'4 of 4 overturned verdicts were this one: overturned in 4 of 5 judged runs (80 %, 95 % 38–96 %) against 4 of 13 (31 %) for the version'
			}
		]);
		// isolate-other-modules was on the path of all four too, but 4 of 7 (lower end 0.2505) is
		// not clearly above the version's 4 of 13.
		const m = stepOf(h, M);
		expect(m.overturned).toEqual(shareOf(4, 7));
		expect(m.flags).toEqual([]);
		expect(stepOf(h, 'battery-out-of-service')).toMatchObject({ reached: 2, answered: 2 });
		expect(stepOf(h, 'battery-out-of-service').overturned).toEqual(shareOf(0, 2));
		expect(stepOf(h, 'module-fault').overturned).toEqual(shareOf(0, 2));
		expect(stepOf(h, 'no-restart-on-bench').overturned).toEqual(shareOf(0, 4));
		// A step no run reached: zeros, no flags.
		expect(stepOf(h, 'front-line-short')).toMatchObject({ reached: 0, answered: 0, time: null, flags: [] });
	});
});

describe('standouts for the senior’s Today', () => {
	it('lists the flagged steps of the current version, most reasons first, with reason and editor link', async () => {
		const all = await flowHealth.standouts(10);
		// Two reasons first; then by runs that reached the step (10, 5, 5), ties in authored order.
		expect(all.map((s) => s.stepId)).toEqual([O, F, C, 'corrosion-cleaned']);
		expect(all[0]).toEqual({
			flowId: FLOW,
			flowTitle: expect.any(String),
			version: 1,
			stepId: O,
			stepTitle: 'Open the phone and disconnect the battery',
			kind: 'test',
			reasons: [
				'answers revised in 42 % of runs (5/12, 95 % 19–68 %)',
				'median 40 min against 15 expected (12 answers)'
			],
			href: `/flows/${FLOW}/drafts/new?from=1&step=${O}`,
			healthHref: `/flows/${FLOW}/health?version=1#step-${O}`
		});
		expect(await flowHealth.standouts(2)).toHaveLength(2);
	});
});

describe('kept up to date incrementally', () => {
	it('finds each revised step whether the revised answer lies in the span read or further back', async () => {
		// One id per statement: a BACK's revised answer is then in the window only when it is the row
		// just before it; run 7's second BACK revises an answer two rows back and is looked up.
		const db = await getDb();
		const small = new RevisionStore(1, 0);
		await small.sync(db, () => true);
		expect(small.byRun).toEqual(revisionStore().byRun);
		expect(small.byRun.get(ids[6])).toEqual(new Set([I, D]));
		expect(small.byRun.get(ids[0])).toEqual(new Set([O]));
		// Distinct revised steps per run: runs 1–5, 6, 7 (two), 14 and the run under way.
		expect(small.generation).toBe(10);
	});

	it('counts a run that finishes later, with its revision, and ignores other versions', async () => {
		// The run under way finishes (its revision of open-and-disconnect was read while it ran).
		const db = await getDb();
		const [running] = await db.select().from(runsTable).where(eq(runsTable.status, 'in-progress'));
		await db
			.update(runsTable)
			.set({ status: 'abandoned', finishedAt: new Date(), abandonReason: 'Parts on order' })
			.where(eq(runsTable.id, running.id));
		await rebuildFacts(db);
		const h = (await flowHealth.forVersion(FLOW, 1))!;
		expect(h.runs).toBe(18);
		expect(stepOf(h, O).revised).toEqual(shareOf(6, 13));
		expect(stepOf(h, O).abandoned).toEqual(shareOf(1, 13));

		// Version 2 is published; its run changes nothing on version 1, and Today now looks at v2.
		fs.writeFileSync(
			path.join(tmp, `${FLOW}.flow.yaml`),
			fs
				.readFileSync(path.resolve('flows', `${FLOW}.flow.yaml`), 'utf8')
				.replace(/^summary: >-\n/m, 'summary: >-\n  Revised.\n')
		);
		await library.importFromFiles(tmp);
		const v2 = (await library.getVersion(FLOW, 2))!;
		await addRun(v2.id, [p(2)], { verdict: 'no-restart-on-bench' });
		await rebuildFacts(db);
		expect((await flowHealth.forVersion(FLOW, 1))!.runs).toBe(18);
		expect((await flowHealth.forVersion(FLOW, 2))!).toMatchObject({ runs: 1, flagged: 0 });
		expect(await flowHealth.standouts(10)).toEqual([]);
		expect(await flowHealth.runsPerVersion(FLOW)).toEqual(
			new Map([
				[1, 18],
				[2, 1]
			])
		);
		expect(await flowHealth.forVersion(FLOW, 3)).toBeUndefined();
	});
});
