// Over 300 lines on purpose: one spec of the run lifecycle, each case building on the same small shop.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq, sql } from 'drizzle-orm';
import { getDb } from '$lib/server/db';
import { auditLog } from '$lib/server/db/schema';
import { runSteps, runs as runsTable } from '$lib/server/db/schema/runs';
import { imeiCheckDigit } from '$lib/domain/identifiers';
import * as staff from '$lib/server/staff/queries';
import * as jobs from '$lib/server/jobs/queries';
import * as library from '$lib/server/flows/queries';
import { makeJobIntake, type JobIntake } from '$lib/schemas/job';
import * as runs from './queries';
import { recordEvent } from '$lib/server/runs/commit';
import { RuleError } from '$lib/server/errors';
import { toCleanAndDry } from './walks';

// Real in-memory PGlite migrated from drizzle/ (DATA_DIR=memory:// in vite.config.ts). The shipped
// restart-loop flow is the fixture: its steps and outcomes are quoted from
// flows/restart-loop-after-liquid.flow.yaml.
const FLOW = 'restart-loop-after-liquid';
const flowFile = `${FLOW}.flow.yaml`;
const shipped = fs.readFileSync(path.resolve('flows', flowFile), 'utf8');
const tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-runs-'));
let tech: { id: string };
let counter = 0;

/** Invented test IMEIs: "00" bodies (test reporting body, from memory), check digit computed. */
const imei = (body14: string) => `${body14}${imeiCheckDigit(body14)}`;
const key = () => `test-key-${++counter}-${Math.random().toString(36).slice(2)}`;

function intake(over: Partial<JobIntake> = {}): JobIntake {
	return makeJobIntake().parse({
		customerName: 'Ebba Quillfeather',
		customerPhone: '+00 555 0100',
		maker: 'Corvana',
		model: 'Tern 5',
		imei: imei('00220000000001'),
		symptoms: ['restart-loop'],
		liquid: 'salt',
		submerged: false,
		passcodeStatus: 'given',
		consentToOpen: true,
		...over
	});
}

async function newRun(over: Partial<JobIntake> = {}) {
	const job = await jobs.create(tech.id, intake(over));
	const run = await runs.start(job.id, FLOW, tech);
	return { job, run };
}

async function stepRows(runId: string) {
	const db = await getDb();
	return db.select().from(runSteps).where(eq(runSteps.runId, runId)).orderBy(runSteps.seq);
}

async function refusal(p: Promise<unknown>): Promise<RuleError> {
	const e = await p.then(
		() => undefined,
		(err: unknown) => err
	);
	expect(e).toBeInstanceOf(RuleError);
	return e as RuleError;
}

beforeAll(async () => {
	tech = await staff.create(null, {
		name: 'Juno Callardine',
		email: 'juno@shop.test',
		role: 'technician',
		password: 'tech-password-1'
	});
	fs.writeFileSync(path.join(tmp, flowFile), shipped);
	const report = await library.importFromFiles(tmp);
	expect(report.imported).toHaveLength(1);
});

afterAll(() => fs.rmSync(tmp, { recursive: true, force: true }));

describe('starting a run', () => {
	it('pins the current published version, starts at the first step and moves a received job to diagnosing', async () => {
		const { job, run } = await newRun();
		const v1 = await library.currentPublished(FLOW);
		expect(run.flowVersionId).toBe(v1!.id);
		expect(run.currentStep).toBe('power-on-as-received');
		expect(run.status).toBe('in-progress');
		expect((await jobs.get(job.id))!.status).toBe('diagnosing');
		const db = await getDb();
		const audit = await db.select().from(auditLog).where(eq(auditLog.targetId, run.id));
		expect(audit.map((a) => a.action)).toEqual(['run.start']);
	});

	it('refuses without the customer’s consent to open the phone, and starts once it is recorded', async () => {
		const job = await jobs.create(tech.id, intake({ consentToOpen: false }));
		const e = await refusal(runs.start(job.id, FLOW, tech));
		expect(e.code).toBe('no-consent');
		expect(e.message).toMatch(/consent/);
		expect(await runs.listForJob(job.id)).toEqual([]);
		expect((await jobs.get(job.id))!.status).toBe('received');
		await jobs.recordConsent(job.id, tech.id);
		const run = await runs.start(job.id, FLOW, tech);
		expect(run.status).toBe('in-progress');
	});

	it('refuses a flow with no published version and an unknown job', async () => {
		const job = await jobs.create(tech.id, intake());
		expect((await refusal(runs.start(job.id, 'no-such-flow', tech))).code).toBe('flow-not-published');
		expect((await refusal(runs.start('00000000-0000-4000-8000-000000000000', FLOW, tech))).code).toBe(
			'not-found'
		);
	});
});

describe('events', () => {
	it('walks to a verdict, records that the data is reachable and completes the run', async () => {
		const { job, run } = await newRun();
		const r = await recordEvent(
			run.id,
			{
				type: 'ANSWER',
				stepId: 'power-on-as-received',
				outcome: 'Boots to the lock screen and stays up',
				idempotencyKey: key(),
				notes: ' ran two minutes '
			},
			tech
		);
		expect(r.state).toMatchObject({
			status: 'completed',
			currentStep: 'no-restart-on-bench',
			verdictCode: 'no-restart-on-bench',
			dataReachable: true
		});
		const detail = await runs.get(run.id);
		expect(detail!.steps).toMatchObject([
			{
				seq: 1,
				stepId: 'power-on-as-received',
				kind: 'symptom',
				notes: 'ran two minutes',
				supersededAt: null
			}
		]);
		expect(detail!.steps[0].answer).toEqual({
			outcome: { index: 2, label: 'Boots to the lock screen and stays up' }
		});
		const [summary] = await runs.listForJob(job.id);
		expect(summary).toMatchObject({ status: 'completed', verdictCode: 'no-restart-on-bench', answers: 1 });
		const db = await getDb();
		const audit = await db.select().from(auditLog).where(eq(auditLog.targetId, run.id));
		expect(audit.map((a) => a.action).sort()).toEqual(['run.complete', 'run.start']);
	});

	it('answers 400 for an outcome the step does not have, naming the outcomes; nothing is written', async () => {
		const { run } = await newRun();
		for (const outcome of [4, -1, 'Explodes']) {
			const e = await refusal(
				recordEvent(
					run.id,
					{ type: 'ANSWER', stepId: 'power-on-as-received', outcome, idempotencyKey: key() },
					tech
				)
			);
			expect(e.status).toBe(400);
			expect(e.message).toContain('1 Restarts again and again');
		}
		const e = await refusal(
			recordEvent(
				run.id,
				{ type: 'MEASURE', stepId: 'power-on-as-received', value: 1, idempotencyKey: key() },
				tech
			)
		);
		expect(e.status).toBe(400);
		expect(
			(
				await refusal(
					recordEvent(run.id, { type: 'BACK', stepId: 'power-on-as-received', idempotencyKey: key() }, tech)
				)
			).status
		).toBe(400);
		expect(await stepRows(run.id)).toEqual([]);
	});

	it('answers 409 with the current state for a step that is no longer current', async () => {
		const { run } = await newRun();
		await recordEvent(
			run.id,
			{ type: 'ANSWER', stepId: 'power-on-as-received', outcome: 0, idempotencyKey: key() },
			tech
		);
		const e = await refusal(
			recordEvent(
				run.id,
				{ type: 'ANSWER', stepId: 'power-on-as-received', outcome: 1, idempotencyKey: key() },
				tech
			)
		);
		expect(e.status).toBe(409);
		expect(e.code).toBe('stale-step');
		expect(e.details.state).toMatchObject({ currentStep: 'open-and-disconnect', status: 'in-progress' });
		expect(await stepRows(run.id)).toHaveLength(1);
	});

	it('treats a repeated idempotency key as a no-op that returns the same result', async () => {
		const { run } = await newRun();
		const k = key();
		const event = { type: 'ANSWER', stepId: 'power-on-as-received', outcome: 0, idempotencyKey: k } as const;
		const first = await recordEvent(run.id, event, tech);
		const before = await stepRows(run.id);
		const [runBefore] = await (await getDb()).select().from(runsTable).where(eq(runsTable.id, run.id));
		// The same key again, even after the run moved on, returns the stored answer unchanged.
		const again = await recordEvent(run.id, event, tech);
		expect(again).toEqual(first);
		expect(await stepRows(run.id)).toEqual(before);
		const [runAfter] = await (await getDb()).select().from(runsTable).where(eq(runsTable.id, run.id));
		expect(runAfter.updatedAt).toEqual(runBefore.updatedAt);
		expect(first.state.currentStep).toBe('open-and-disconnect');
	});

	it('routes a reading by its range and refuses one outside the valid readings with the reason', async () => {
		const { run } = await newRun();
		const answer = (stepId: string, outcome: number) =>
			recordEvent(run.id, { type: 'ANSWER', stepId, outcome, idempotencyKey: key() }, tech);
		await answer('power-on-as-received', 0);
		await answer('open-and-disconnect', 1);
		await answer('inspect-front-area', 0);
		const r = await answer('isolate-front-flex', 0);
		expect(r.state).toMatchObject({ currentStep: 'front-connector-diode', dataReachable: true });
		// The step's domain is 0–3 V (flow file); 5 V is refused with the machine's own words.
		const e = await refusal(
			recordEvent(
				run.id,
				{ type: 'MEASURE', stepId: 'front-connector-diode', value: 5, idempotencyKey: key() },
				tech
			)
		);
		expect(e.status).toBe(400);
		expect(e.message).toBe('A reading above 3 V is not possible here.');
		const ok = await recordEvent(
			run.id,
			{ type: 'MEASURE', stepId: 'front-connector-diode', value: 0.01, idempotencyKey: key() },
			tech
		);
		// Below 0.05 V is the "Short to ground" band → front-line-short (flow file).
		expect(ok.state).toMatchObject({ status: 'completed', verdictCode: 'front-line-short' });
		const steps = await stepRows(run.id);
		expect(steps.at(-1)!.answer).toEqual({
			value: 0.01,
			unit: 'V',
			range: { index: 0, label: 'Short to ground' }
		});
	});

	it('BACK keeps the revised answer in the trail, marked superseded, and returns to its step', async () => {
		const { run } = await newRun();
		await recordEvent(
			run.id,
			{ type: 'ANSWER', stepId: 'power-on-as-received', outcome: 0, idempotencyKey: key() },
			tech
		);
		await recordEvent(
			run.id,
			{ type: 'ANSWER', stepId: 'open-and-disconnect', outcome: 1, idempotencyKey: key() },
			tech
		);
		const back = await recordEvent(
			run.id,
			{ type: 'BACK', stepId: 'inspect-front-area', idempotencyKey: key() },
			tech
		);
		expect(back.state.currentStep).toBe('open-and-disconnect');
		await recordEvent(
			run.id,
			{ type: 'ANSWER', stepId: 'open-and-disconnect', outcome: 0, idempotencyKey: key() },
			tech
		);
		const detail = await runs.get(run.id);
		expect(detail!.status).toBe('completed');
		expect(detail!.verdictCode).toBe('battery-out-of-service');
		expect(detail!.steps.map((s) => [s.seq, s.stepId, s.kind, s.supersededAt !== null])).toEqual([
			[1, 'power-on-as-received', 'symptom', false],
			[2, 'open-and-disconnect', 'test', true],
			[3, 'inspect-front-area', 'back', false],
			[4, 'open-and-disconnect', 'test', false]
		]);
		expect(detail!.steps[1].answer).toEqual({
			outcome: { index: 1, label: 'Battery looks normal and is disconnected' }
		});
		expect(detail!.steps[2].answer).toEqual({ back: { revised: 2 } });
	});

	it('BACK after BACK, and BACK after a new answer, each revise the newest answer still standing', async () => {
		const { run } = await newRun();
		const send = (type: 'ANSWER' | 'BACK', stepId: string, outcome = 0) =>
			recordEvent(
				run.id,
				type === 'ANSWER'
					? { type, stepId, outcome, idempotencyKey: key() }
					: { type, stepId, idempotencyKey: key() },
				tech
			);
		await send('ANSWER', 'power-on-as-received', 0); // 1
		await send('ANSWER', 'open-and-disconnect', 1); // 2
		await send('ANSWER', 'inspect-front-area', 1); // 3: No corrosion seen
		expect((await send('BACK', 'isolate-front-flex')).state.currentStep).toBe('inspect-front-area'); // 4
		expect((await send('BACK', 'inspect-front-area')).state.currentStep).toBe('open-and-disconnect'); // 5
		await send('ANSWER', 'open-and-disconnect', 1); // 6
		expect((await send('BACK', 'inspect-front-area')).state.currentStep).toBe('open-and-disconnect'); // 7
		const detail = await runs.get(run.id);
		expect(detail!.steps.map((s) => [s.seq, s.kind === 'back' ? s.answer : s.supersededAt !== null])).toEqual(
			[
				[1, false],
				[2, true],
				[3, true],
				[4, { back: { revised: 3 } }],
				[5, { back: { revised: 2 } }],
				[6, true],
				[7, { back: { revised: 6 } }]
			]
		);
	});

	it('refuses events on a finished run and abandons only a run under way, with its reason', async () => {
		const { run } = await newRun();
		const abandoned = await runs.abandon(run.id, '  Customer collected the phone unrepaired ', tech);
		expect(abandoned).toMatchObject({
			status: 'abandoned',
			abandonReason: 'Customer collected the phone unrepaired'
		});
		expect(abandoned.finishedAt).toBeInstanceOf(Date);
		const e = await refusal(
			recordEvent(
				run.id,
				{ type: 'ANSWER', stepId: 'power-on-as-received', outcome: 0, idempotencyKey: key() },
				tech
			)
		);
		expect([e.status, e.code]).toEqual([409, 'run-finished']);
		expect((await refusal(runs.abandon(run.id, 'again', tech))).status).toBe(409);
	});
});

describe('transactions', () => {
	it('leaves no half-written event when the step row fails after the run row was moved on', async () => {
		const { run } = await newRun();
		const db = await getDb();
		// run_event_write moves the run row on first; a trigger makes the step row's insert after it fail.
		await db.execute(sql`create function tm_fail_step_insert() returns trigger language plpgsql as
			$$ begin raise exception 'forced failure of the step insert'; end $$`);
		await db.execute(
			sql`create trigger tm_fail before insert on run_steps for each row execute function tm_fail_step_insert()`
		);
		try {
			await expect(
				recordEvent(
					run.id,
					{ type: 'ANSWER', stepId: 'power-on-as-received', outcome: 0, idempotencyKey: key() },
					tech
				)
			).rejects.toThrow();
		} finally {
			await db.execute(sql`drop trigger tm_fail on run_steps`);
			await db.execute(sql`drop function tm_fail_step_insert()`);
		}
		expect(await stepRows(run.id)).toEqual([]);
		const detail = await runs.get(run.id);
		expect(detail!.currentStep).toBe('power-on-as-received');
		const [row] = await db.select().from(runsTable).where(eq(runsTable.id, run.id));
		expect(row.lastSeq).toBe(0);
		// The same event goes through once the fault is gone.
		const ok = await recordEvent(
			run.id,
			{ type: 'ANSWER', stepId: 'power-on-as-received', outcome: 0, idempotencyKey: key() },
			tech
		);
		expect(ok.seq).toBe(1);
	});
});

// Events of one run sent side by side (commit.ts): each is decided against one read and written only
// while the run still stands there, so they land one after the other, each decided against the last.
describe('events that race', () => {
	async function atCleanAndDry() {
		const { run } = await newRun();
		for (const [stepId, outcome] of toCleanAndDry)
			await recordEvent(run.id, { type: 'ANSWER', stepId, outcome, idempotencyKey: key() }, tech);
		return run.id;
	}
	const event = (runId: string, type: 'ANSWER' | 'BACK', idempotencyKey = key()) =>
		recordEvent(
			runId,
			type === 'ANSWER'
				? { type, stepId: 'clean-and-dry', outcome: 1, idempotencyKey }
				: { type, stepId: 'clean-and-dry', idempotencyKey },
			tech
		);

	it('numbers valid events one after the other', async () => {
		const runId = await atCleanAndDry();
		// "Dry longer" stays on clean-and-dry, so all three are valid in any order.
		const results = await Promise.all([
			event(runId, 'ANSWER'),
			event(runId, 'ANSWER'),
			event(runId, 'ANSWER')
		]);
		expect(results.map((r) => r.seq).sort()).toEqual([6, 7, 8]);
		expect((await stepRows(runId)).map((r) => r.seq)).toEqual([1, 2, 3, 4, 5, 6, 7, 8]);
	});

	it('stores a key sent twice at once once, and answers both with the same result', async () => {
		const runId = await atCleanAndDry();
		const [a, b] = await Promise.all([
			event(runId, 'ANSWER', 'same-key'),
			event(runId, 'ANSWER', 'same-key')
		]);
		expect(b).toEqual(a);
		expect((await stepRows(runId)).filter((r) => r.idempotencyKey === 'same-key')).toHaveLength(1);
	});

	it('of one key sent at once with two different bodies, one lands and the other is refused with 422', async () => {
		const runId = await atCleanAndDry();
		const results = await Promise.allSettled([
			event(runId, 'ANSWER', 'reused-key'),
			event(runId, 'BACK', 'reused-key')
		]);
		expect(results.filter((r) => r.status === 'fulfilled')).toHaveLength(1);
		const refused = results.find((r) => r.status === 'rejected') as PromiseRejectedResult;
		expect(refused.reason).toMatchObject({ status: 422, code: 'key-reused' });
		expect((await stepRows(runId)).filter((r) => r.idempotencyKey === 'reused-key')).toHaveLength(1);
	});

	it('of two BACKs sent together from the same step one lands; the other finds the run moved on', async () => {
		const runId = await atCleanAndDry();
		const [a, b] = await Promise.allSettled([event(runId, 'BACK'), event(runId, 'BACK')]);
		const landed = [a, b].filter((r) => r.status === 'fulfilled');
		const late = [a, b].find((r) => r.status === 'rejected');
		expect(landed).toHaveLength(1);
		expect(late?.reason).toMatchObject({ status: 409, code: 'stale-step' });
		expect((late?.reason as RuleError).details.state).toMatchObject({ currentStep: 'isolate-other-modules' });
		const rows = await stepRows(runId);
		expect(rows.filter((r) => r.kind === 'back')).toHaveLength(1);
		expect(rows.filter((r) => r.supersededAt !== null).map((r) => r.stepId)).toEqual([
			'isolate-other-modules'
		]);
	});

	it('an answer sent with an abandon lands before it or is refused; the run ends abandoned either way', async () => {
		const runId = await atCleanAndDry();
		const [answered] = await Promise.allSettled([
			event(runId, 'ANSWER'),
			runs.abandon(runId, 'Customer collected the phone', tech)
		]);
		const rows = await stepRows(runId);
		if (answered.status === 'fulfilled') expect(rows).toHaveLength(6);
		else {
			expect(answered.reason).toMatchObject({ status: 409, code: 'run-finished' });
			expect(rows).toHaveLength(5);
		}
		expect((await runs.get(runId))!.status).toBe('abandoned');
	});

	it('writes nothing for an event decided against a read the run has moved past', async () => {
		const runId = await atCleanAndDry();
		const db = await getDb();
		const facts = await runs.eventFacts(db, runId, { key: key(), seen: false, back: false });
		await event(runId, 'ANSWER'); // another event lands after the read
		const { run } = facts;
		const write = {
			run,
			next: { ...run, snapshot: { moved: 'never' } },
			at: new Date(),
			seq: facts.seq,
			kind: 'test',
			answer: { outcome: { index: 1, label: 'stale' } },
			notes: '',
			actorId: tech.id,
			key: key(),
			hash: 'stale',
			result: { seq: facts.seq, state: runs.stateOf(run) },
			revises: null
		};
		expect(await runs.writeStep(db, write)).toBe(false);
		const rows = await stepRows(runId);
		expect(rows.map((r) => r.seq)).toEqual([1, 2, 3, 4, 5, 6]);
		expect(rows.some((r) => r.bodyHash === 'stale')).toBe(false);
		// Decided again against a fresh read, the same write lands as the next step.
		const fresh = await runs.eventFacts(db, runId, { key: key(), seen: false, back: false });
		expect(await runs.writeStep(db, { ...write, run: fresh.run, seq: fresh.seq })).toBe(true);
		expect((await stepRows(runId)).map((r) => r.seq)).toEqual([1, 2, 3, 4, 5, 6, 7]);
	});

	it('a key answered once returns the stored result even after the run moved on', async () => {
		const runId = await atCleanAndDry();
		const first = await event(runId, 'ANSWER', 'twice');
		await event(runId, 'BACK');
		expect(await event(runId, 'ANSWER', 'twice')).toEqual(first);
		expect((await stepRows(runId)).filter((r) => r.idempotencyKey === 'twice')).toHaveLength(1);
	});
});

describe('pinned version', () => {
	it('a run under way keeps its version when a new one is published; new runs take the new one', async () => {
		const { run } = await newRun();
		const renamed = shipped.replace('- label: Restarts again and again', '- label: Keeps restarting');
		expect(renamed).not.toBe(shipped);
		fs.writeFileSync(path.join(tmp, flowFile), renamed);
		const report = await library.importFromFiles(tmp);
		expect(report.imported).toMatchObject([{ flowId: FLOW, version: 2 }]);

		// The old run still speaks version 1's words …
		const r = await recordEvent(
			run.id,
			{
				type: 'ANSWER',
				stepId: 'power-on-as-received',
				outcome: 'Restarts again and again',
				idempotencyKey: key()
			},
			tech
		);
		expect(r.state.currentStep).toBe('open-and-disconnect');
		expect((await runs.get(run.id))!.flow.version).toBe(1);
		// The stored snapshot is live: a machine restored from it (as the run screen does) moves on.
		expect(r.state.snapshot.status).toBe('active');

		// … and a new run is on version 2, where that label no longer exists.
		const { run: fresh } = await newRun();
		expect((await runs.get(fresh.id))!.flow.version).toBe(2);
		const e = await refusal(
			recordEvent(
				fresh.id,
				{
					type: 'ANSWER',
					stepId: 'power-on-as-received',
					outcome: 'Restarts again and again',
					idempotencyKey: key()
				},
				tech
			)
		);
		expect(e.status).toBe(400);
		expect(e.message).toContain('1 Keeps restarting');
	});
});
