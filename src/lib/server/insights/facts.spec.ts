import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { getDb } from '$lib/server/db';
import { insightRunFacts } from '$lib/server/db/schema/insights';
import { imeiCheckDigit } from '$lib/domain/identifiers';
import * as staff from '$lib/server/staff/queries';
import * as jobs from '$lib/server/jobs/queries';
import * as library from '$lib/server/flows/queries';
import * as runs from '$lib/server/runs/queries';
import { recordEvent } from '$lib/server/runs/commit';
import { makeJobIntake } from '$lib/schemas/job';
import * as insights from './queries';

// The facts row is written by the runs code itself, in the transaction that finishes the run.
const FLOW = 'restart-loop-after-liquid';
const tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-facts-'));
let tech: { id: string };
let n = 0;

async function startRun() {
	const body = `0077000000000${++n}`;
	const job = await jobs.create(
		tech.id,
		makeJobIntake().parse({
			customerName: 'Fixture Customer',
			customerPhone: '+00 555 0100',
			maker: 'Corvana',
			model: 'Tern 6 Pro',
			imei: `${body}${imeiCheckDigit(body)}`,
			symptoms: ['restart-loop'],
			liquid: 'fresh',
			submerged: false,
			passcodeStatus: 'given',
			consentToOpen: true
		})
	);
	return runs.start(job.id, FLOW, tech);
}

async function factOf(runId: string) {
	const db = await getDb();
	const [row] = await db.select().from(insightRunFacts).where(eq(insightRunFacts.runId, runId));
	return row;
}

beforeAll(async () => {
	tech = await staff.create(null, {
		name: 'Bram Ellery',
		email: 'bram@shop.test',
		role: 'technician',
		password: 'tech-password-1'
	});
	fs.copyFileSync(path.resolve('flows', `${FLOW}.flow.yaml`), path.join(tmp, `${FLOW}.flow.yaml`));
	await library.importFromFiles(tmp);
});

afterAll(() => fs.rmSync(tmp, { recursive: true, force: true }));

describe('facts written by the runs code', () => {
	it('a run that reaches its verdict has its facts at once; one under way has none', async () => {
		const run = await startRun();
		expect(await factOf(run.id)).toBeUndefined();
		// "Does not restart on the bench" (third answer) is a verdict straight away.
		await recordEvent(
			run.id,
			{ type: 'ANSWER', stepId: 'power-on-as-received', outcome: 2, idempotencyKey: `k-${run.id}` },
			tech
		);
		const fact = await factOf(run.id);
		expect(fact).toMatchObject({
			status: 'completed',
			verdictCode: 'no-restart-on-bench',
			flowId: FLOW,
			version: 1,
			deviceModel: 'Corvana Tern 6 Pro',
			technicianId: tech.id,
			stepIds: ['power-on-as-received'],
			outcomes: [2]
		});
	});

	it('an abandoned run has its facts with the reason and the step it stopped at', async () => {
		const run = await startRun();
		await runs.abandon(run.id, 'Customer wants the phone back unrepaired', tech);
		expect(await factOf(run.id)).toMatchObject({
			status: 'abandoned',
			verdictCode: null,
			abandonReason: 'Customer wants the phone back unrepaired',
			abandonStep: 'power-on-as-received',
			stepIds: []
		});
		const a = await insights.abandoned({});
		expect([a.finished, a.abandoned]).toEqual([2, 1]);
	});
});
