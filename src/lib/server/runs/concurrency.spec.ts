import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { closeDb, getDb, getHandle } from '$lib/server/db';
import { runs as runRows, runSteps } from '$lib/server/db/schema/runs';
import type { Tx } from '$lib/server/db';
import { recordRunFinished } from '$lib/server/insights/facts';
import { FactStore } from '$lib/server/insights/store';
import { imeiCheckDigit } from '$lib/domain/identifiers';
import { makeJobIntake } from '$lib/schemas/job';
import * as staff from '$lib/server/staff/queries';
import * as jobs from '$lib/server/jobs/queries';
import * as library from '$lib/server/flows/queries';
import * as runs from './queries';
import { recordEvent } from '$lib/server/runs/commit';
import { toCleanAndDry } from './walks';

// Two events for the same run at the same moment, on a PostgreSQL server, where transactions really
// run side by side (PGlite runs one at a time). Runs when TEST_DATABASE_URL names a disposable
// database (.ci/run starts one). The shipped restart-loop flow's "clean-and-dry" step answers
// "dry longer" by staying where it is, so two such answers are both valid, one after the other.
const url = process.env.TEST_DATABASE_URL;
const FLOW = 'restart-loop-after-liquid';

describe.runIf(url)('step events side by side on PostgreSQL', () => {
	let tech: { id: string };
	const tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-concurrency-'));

	beforeAll(async () => {
		await closeDb();
		process.env.DATABASE_URL = url;
		expect((await getHandle()).kind).toBe('postgres');
		fs.copyFileSync(path.resolve('flows', `${FLOW}.flow.yaml`), path.join(tmp, `${FLOW}.flow.yaml`));
		await library.importFromFiles(tmp);
		tech = await staff.create(null, {
			name: 'Ines Marrow',
			email: `ines-${randomUUID()}@shop.test`,
			role: 'technician',
			password: 'tech-password-1'
		});
	});

	afterAll(async () => {
		await closeDb();
		delete process.env.DATABASE_URL;
		fs.rmSync(tmp, { recursive: true, force: true });
	});

	async function runAtCleanAndDry() {
		const body = `0077${String(Date.now() % 1e10).padStart(10, '0')}`;
		const job = await jobs.create(
			tech.id,
			makeJobIntake().parse({
				customerName: 'Ola Fenn',
				customerPhone: '+00 555 0100',
				maker: 'Corvana',
				model: 'Tern 5',
				imei: body + imeiCheckDigit(body),
				symptoms: ['restart-loop'],
				liquid: 'fresh',
				submerged: false,
				passcodeStatus: 'withheld',
				consentToOpen: true
			})
		);
		const run = await runs.start(job.id, FLOW, tech);
		for (const [stepId, outcome] of toCleanAndDry)
			await recordEvent(run.id, { type: 'ANSWER', stepId, outcome, idempotencyKey: randomUUID() }, tech);
		return run.id;
	}

	it('numbers two valid events one after the other instead of failing on a duplicate step number', async () => {
		const runId = await runAtCleanAndDry();
		const dryLonger = () =>
			recordEvent(
				runId,
				{ type: 'ANSWER', stepId: 'clean-and-dry', outcome: 1, idempotencyKey: randomUUID() },
				tech
			);
		const results = await Promise.all([dryLonger(), dryLonger(), dryLonger()]);
		expect(results.map((r) => r.seq).sort((a, b) => a - b)).toEqual([6, 7, 8]);
		const db = await getDb();
		expect(await db.select().from(runSteps).where(eq(runSteps.runId, runId))).toHaveLength(8);
	});

	it('answers a key sent twice at once with the same result and one stored step', async () => {
		const runId = await runAtCleanAndDry();
		const key = randomUUID();
		const send = () =>
			recordEvent(runId, { type: 'ANSWER', stepId: 'clean-and-dry', outcome: 1, idempotencyKey: key }, tech);
		const [a, b] = await Promise.all([send(), send()]);
		expect(b).toEqual(a);
		const db = await getDb();
		expect(await db.select().from(runSteps).where(eq(runSteps.idempotencyKey, key))).toHaveLength(1);
	});

	it("makes finished runs' insight facts visible in their seq order, so a catch-up between two commits misses none", async () => {
		const [first, second] = [await runAtCleanAndDry(), await runAtCleanAndDry()];
		const db = await getDb();
		const store = new FactStore();
		await store.sync(db);
		const finish = async (tx: Tx, runId: string) => {
			await tx
				.update(runRows)
				.set({ status: 'abandoned', abandonReason: 'Seq order test', finishedAt: new Date() })
				.where(eq(runRows.id, runId));
			await recordRunFinished(tx, runId);
		};
		let release!: () => void;
		const held = new Promise<void>((r) => (release = r));
		// The first finish draws its seq and stays open; the second would draw the next one and commit.
		const a = db.transaction(async (tx) => {
			await finish(tx, first);
			await held;
		});
		await new Promise((r) => setTimeout(r, 150));
		const b = db.transaction((tx) => finish(tx, second));
		await new Promise((r) => setTimeout(r, 300));
		await store.sync(db); // a reader between the two commits
		release();
		await Promise.all([a, b]);
		await store.sync(db);
		expect([store.byRun.has(first), store.byRun.has(second)]).toEqual([true, true]);
	});
});
