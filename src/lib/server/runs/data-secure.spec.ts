// Over 300 lines on purpose: a spec: the data-first hold through the run, the API and the job page.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { and, eq } from 'drizzle-orm';
import { getDb } from '$lib/server/db';
import { auditLog } from '$lib/server/db/schema';
import { runSteps } from '$lib/server/db/schema/runs';
import { imeiCheckDigit } from '$lib/domain/identifiers';
import { dataFirstFlow } from '$lib/flows/data-first-fixture';
import { toFlowYaml } from '$lib/flows/to-yaml';
import * as staff from '$lib/server/staff/queries';
import * as jobs from '$lib/server/jobs/queries';
import * as library from '$lib/server/flows/queries';
import * as report from '$lib/server/reports/report';
import * as quotes from '$lib/server/quotes/queries';
import { makeJobIntake, type JobIntake } from '$lib/schemas/job';
import { PUT as putData } from '../../../routes/api/jobs/[id]/data/+server';
import { actions as jobPage } from '../../../routes/(app)/jobs/[id]/+page.server';
import * as runs from './queries';
import { recordEvent } from './commit';
import { RuleError } from '$lib/server/errors';

// Real in-memory PGlite (DATA_DIR=memory://). The flow is the data-first fixture
// (src/lib/flows/data-first-fixture.ts), published from a temporary folder: the shipped flows are
// not used, so their rewrites cannot change what this spec walks.
const flow = dataFirstFlow();
const tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-data-first-'));
let tech: { id: string; name: string; email: string; role: 'technician' };
let counter = 0;
const key = () => `data-key-${++counter}-${Math.random().toString(36).slice(2)}`;
const imei = (n: number) => {
	const body = `0033${String(n).padStart(10, '0')}`;
	return `${body}${imeiCheckDigit(body)}`;
};

function intake(over: Partial<JobIntake> = {}): JobIntake {
	return makeJobIntake().parse({
		customerName: 'Wren Halloway',
		customerEmail: 'wren@example.test',
		maker: 'Corvana',
		model: 'Tern 5',
		imei: imei(++counter),
		symptoms: ['no-power'],
		liquid: 'fresh',
		submerged: false,
		passcodeStatus: 'given',
		consentToOpen: true,
		dataFirst: true,
		...over
	});
}

async function newRun(over: Partial<JobIntake> = {}) {
	const job = await jobs.create(tech.id, intake(over));
	const run = await runs.start(job.id, flow.id, tech);
	return { job, run };
}

const answer = (runId: string, stepId: string, outcome: number) =>
	recordEvent(runId, { type: 'ANSWER', stepId, outcome, idempotencyKey: key() }, tech);

async function refusal(p: Promise<unknown>): Promise<RuleError> {
	const e = await p.then(
		() => undefined,
		(err: unknown) => err
	);
	expect(e).toBeInstanceOf(RuleError);
	return e as RuleError;
}

async function stepCount(runId: string) {
	const db = await getDb();
	return (await db.select().from(runSteps).where(eq(runSteps.runId, runId))).length;
}

/** The data route as the run screen calls it. */
function put(jobId: string, body: unknown, user: typeof tech | null = tech) {
	const url = new URL(`http://shop.test/api/jobs/${jobId}/data`);
	return putData({
		url,
		request: new Request(url, {
			method: 'PUT',
			headers: { 'content-type': 'application/json' },
			body: JSON.stringify(body)
		}),
		locals: { user },
		params: { id: jobId },
		route: { id: '/api/jobs/[id]/data' }
	} as never);
}

beforeAll(async () => {
	const t = await staff.create(null, {
		name: 'Ossian Brack',
		email: 'ossian@shop.test',
		role: 'technician',
		password: 'ossian-password-1'
	});
	tech = { id: t.id, name: t.name, email: t.email, role: 'technician' };
	fs.writeFileSync(path.join(tmp, `${flow.id}.flow.yaml`), toFlowYaml(flow));
	const imported = await library.importFromFiles(tmp);
	expect(imported.imported).toHaveLength(1);
});

afterAll(() => fs.rmSync(tmp, { recursive: true, force: true }));

describe('the data-first gate on step events', () => {
	it('refuses a move into a hot-air step or a board-level verdict until the outcome is recorded, then lets it through', async () => {
		const { job, run } = await newRun();
		const first = await answer(run.id, 'boots', 0);
		expect(first.state).toMatchObject({ currentStep: 'inspect', dataReachable: true });

		for (const [outcome, title] of [
			[0, 'Lift the corroded part with hot air'],
			[1, 'Short on the board']
		] as const) {
			const e = await refusal(answer(run.id, 'inspect', outcome));
			expect(e.status).toBe(409);
			expect(e.code).toBe('data-not-secured');
			expect(e.message).toContain(`“${title}”`);
			expect(e.details.state).toMatchObject({ currentStep: 'inspect', status: 'in-progress' });
		}
		expect(await stepCount(run.id)).toBe(1);

		const res = await put(job.id, {
			outcome: 'backed-up',
			note: 'Copied to the customer’s drive',
			runId: run.id
		});
		expect(res.status).toBe(200);
		expect(await res.json()).toMatchObject({
			dataOutcome: 'backed-up',
			dataNote: 'Copied to the customer’s drive'
		});

		expect((await answer(run.id, 'inspect', 0)).state.currentStep).toBe('lift-part');
		const done = await answer(run.id, 'lift-part', 0);
		expect(done.state).toMatchObject({ status: 'completed', verdictCode: 'part-replaced' });
	});

	it('holds the answer at a risky step reached by the answer that proved the data reachable', async () => {
		const { job, run } = await newRun();
		// The reachable answer leads straight into the hot-air step: held too, so nothing risky is reached unasked.
		const e = await refusal(answer(run.id, 'boots', 1));
		expect(e.code).toBe('data-not-secured');
		expect(await stepCount(run.id)).toBe(0);
		expect(
			(await put(job.id, { outcome: 'declined', note: 'Customer wants the phone fixed only' })).status
		).toBe(200);
		expect((await answer(run.id, 'boots', 1)).state.currentStep).toBe('lift-part');
	});

	it('lets safe steps, BACK, and unreachable data through on a data-first job', async () => {
		const { run } = await newRun();
		await answer(run.id, 'boots', 0);
		expect((await answer(run.id, 'inspect', 2)).state).toMatchObject({
			status: 'completed',
			verdictCode: 'fine'
		});

		const other = (await newRun()).run;
		await answer(other.id, 'boots', 0);
		const back = await recordEvent(
			other.id,
			{ type: 'BACK', stepId: 'inspect', idempotencyKey: key() },
			tech
		);
		expect(back.state).toMatchObject({ currentStep: 'boots', dataReachable: null });
		// Stays dark: the data is not reachable, so there is nothing to secure first.
		await answer(other.id, 'boots', 2);
		expect((await answer(other.id, 'inspect', 0)).state.currentStep).toBe('lift-part');
	});

	it('holds a later run of the job too once an earlier run reached the data', async () => {
		const { job, run } = await newRun();
		await answer(run.id, 'boots', 0);
		await runs.abandon(run.id, 'Customer took the phone back for a day', tech);
		const second = await runs.start(job.id, flow.id, tech);
		await answer(second.id, 'boots', 2); // stays dark today
		expect((await refusal(answer(second.id, 'inspect', 0))).code).toBe('data-not-secured');
		await put(job.id, { outcome: 'not-possible', note: 'Stays dark now; nothing to copy from' });
		expect((await answer(second.id, 'inspect', 0)).state.currentStep).toBe('lift-part');
	});

	it('never holds a job that is not data-first', async () => {
		const { run } = await newRun({ dataFirst: false });
		await answer(run.id, 'boots', 0);
		await answer(run.id, 'inspect', 0);
		const done = await answer(run.id, 'lift-part', 0);
		expect(done.state).toMatchObject({
			status: 'completed',
			verdictCode: 'part-replaced',
			dataReachable: true
		});
	});
});

describe('PUT /api/jobs/:id/data', () => {
	it('stores outcome, note, who and when on the job, and audits each change', async () => {
		const { job } = await newRun();
		const before = Date.now();
		expect((await put(job.id, { outcome: 'not-possible', note: '  Locks up during the copy ' })).status).toBe(
			200
		);
		let stored = (await jobs.get(job.id))!;
		expect(stored).toMatchObject({
			dataOutcome: 'not-possible',
			dataNote: 'Locks up during the copy',
			dataRecordedBy: tech.id,
			dataRecordedByName: 'Ossian Brack'
		});
		expect(stored.dataRecordedAt!.getTime()).toBeGreaterThanOrEqual(before - 1000);

		// The same word again changes nothing; a new word replaces it and keeps the old one in the log.
		await put(job.id, { outcome: 'not-possible', note: 'Locks up during the copy' });
		await put(job.id, { outcome: 'backed-up', note: 'Second attempt worked, copied to shop disk' });
		stored = (await jobs.get(job.id))!;
		expect(stored.dataOutcome).toBe('backed-up');
		const db = await getDb();
		const audit = await db
			.select()
			.from(auditLog)
			.where(and(eq(auditLog.targetId, job.id), eq(auditLog.action, 'job.data-outcome')))
			.orderBy(auditLog.id);
		expect(audit.map((a) => a.details)).toEqual([
			{ outcome: 'not-possible', note: 'Locks up during the copy' },
			{
				outcome: 'backed-up',
				note: 'Second attempt worked, copied to shop disk',
				previous: 'not-possible',
				previousNote: 'Locks up during the copy'
			}
		]);
		expect(audit.every((a) => a.actorId === tech.id)).toBe(true);
	});

	it('refuses bad input with 400 and its reason, an unknown job with 404, and a signed-out caller with 401', async () => {
		const { job } = await newRun();
		const noNote = await put(job.id, { outcome: 'backed-up', note: '' });
		expect(noNote.status).toBe(400);
		expect((await noNote.json()).message).toMatch(/Add a note/);
		const badOutcome = await put(job.id, { outcome: 'lost', note: 'whatever' });
		expect(badOutcome.status).toBe(400);
		expect((await badOutcome.json()).message).toMatch(/backed up, customer declined, or not possible/);
		expect((await jobs.get(job.id))!.dataOutcome).toBeNull();
		expect(
			(await put('00000000-0000-4000-8000-000000000000', { outcome: 'declined', note: 'No thanks' })).status
		).toBe(404);
		await expect(put(job.id, { outcome: 'declined', note: 'No thanks' }, null)).rejects.toMatchObject({
			status: 401
		});
	});
});

describe('the job page’s dataOutcome action', () => {
	function post(jobId: string, fields: Record<string, string>, user: typeof tech | null = tech) {
		const url = new URL(`http://shop.test/jobs/${jobId}?/dataOutcome`);
		return jobPage.dataOutcome({
			url,
			request: new Request(url, { method: 'POST', body: new URLSearchParams(fields) }),
			locals: { user },
			params: { id: jobId },
			route: { id: '/(app)/jobs/[id]' }
		} as never);
	}

	it('records or corrects the outcome, and gives a bad form back with its reason', async () => {
		const { job } = await newRun();
		const bad = (await post(job.id, { outcome: 'declined', note: '' })) as {
			status: number;
			data: Record<string, unknown>;
		};
		expect(bad.status).toBe(400);
		// The form comes back with what was chosen and the reason beside the note.
		expect(bad.data.form).toMatchObject({
			data: { outcome: 'declined', note: '' },
			errors: { note: [expect.stringMatching(/Add a note/)] }
		});
		expect(
			await post(job.id, { outcome: 'declined', note: 'Customer said no at the counter' })
		).toMatchObject({ form: { valid: true, message: 'Recorded: Customer declined.' } });
		expect((await jobs.get(job.id))!).toMatchObject({
			dataOutcome: 'declined',
			dataNote: 'Customer said no at the counter'
		});
		// Signed out: sent to sign in (a page action), nothing recorded.
		await expect(post(job.id, { outcome: 'backed-up', note: 'x y z' }, null)).rejects.toMatchObject({
			status: 303
		});
		expect((await jobs.get(job.id))!.dataOutcome).toBe('declined');
	});
});

describe('the report states what became of the data', () => {
	it('says it was backed up in both cuts; only the staff cut has the note and who', async () => {
		const { job, run } = await newRun();
		await answer(run.id, 'boots', 0);
		await put(job.id, { outcome: 'backed-up', note: 'On the customer’s drive' });
		await answer(run.id, 'inspect', 1);
		const staffCut = (await report.build(job.id, 'staff'))!;
		expect(staffCut.data).toMatchObject({
			fate: 'backed-up',
			note: 'On the customer’s drive',
			recordedBy: 'Ossian Brack'
		});
		const customerCut = (await report.build(job.id, 'customer', '/r/x/photos'))!;
		expect(customerCut.data).toMatchObject({ fate: 'backed-up', note: null, recordedBy: null });
		expect(customerCut.data!.recordedAt).toBeInstanceOf(Date);
		// A board-level repair opens the phone; the fixture's risks already say so, so the note is not repeated.
		expect(customerCut.verdict?.severity).toBe('board-level');
		expect(customerCut.verdict?.risks).toMatch(/water resistance/i);
		expect(customerCut.waterResistance).toBe(false);
	});

	it('says water resistance is not assured once a proposed repair opens the phone, not for a fee alone', async () => {
		const { job, run } = await newRun({ dataFirst: false });
		await answer(run.id, 'boots', 0);
		await answer(run.id, 'inspect', 2); // no fault
		await quotes.save(tech.id, job.id, {
			lines: [{ description: 'Diagnosis', kind: 'fee', quantity: 1, unitMinor: 4900 }]
		});
		expect((await report.build(job.id, 'staff'))!.waterResistance).toBe(false);
		await quotes.save(tech.id, job.id, {
			lines: [
				{ description: 'Diagnosis', kind: 'fee', quantity: 1, unitMinor: 4900 },
				{ description: 'Board clean and reseal', kind: 'labour', quantity: 1, unitMinor: 12000 }
			]
		});
		expect((await report.build(job.id, 'staff'))!.waterResistance).toBe(true);
	});

	it('says the data was not reached, or was reachable, and nothing on a job that never asked', async () => {
		const dark = await newRun();
		await answer(dark.run.id, 'boots', 2);
		expect((await report.build(dark.job.id, 'customer'))!.data).toMatchObject({ fate: 'not-reached' });
		const fresh = await newRun();
		expect((await report.build(fresh.job.id, 'customer'))!.data).toMatchObject({ fate: 'not-reached' });
		const plain = await newRun({ dataFirst: false });
		expect((await report.build(plain.job.id, 'customer'))!.data).toBeNull();
		await answer(plain.run.id, 'boots', 0);
		expect((await report.build(plain.job.id, 'staff'))!.data).toMatchObject({
			fate: 'reachable',
			note: null
		});
	});
});
