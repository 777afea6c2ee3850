import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { getDb } from '$lib/server/db';
import { auditLog } from '$lib/server/db/schema';
import { insightRunFacts, verdictConfirmations } from '$lib/server/db/schema/insights';
import { imeiCheckDigit } from '$lib/domain/identifiers';
import * as staff from '$lib/server/staff/queries';
import * as jobs from '$lib/server/jobs/queries';
import * as library from '$lib/server/flows/queries';
import * as runs from '$lib/server/runs/queries';
import { recordEvent } from '$lib/server/runs/commit';
import { makeJobIntake } from '$lib/schemas/job';
import * as checklists from './queries';
import { FUNCTION_TESTS, repairItems } from './queries';
import { RuleError } from '$lib/server/errors';

// Real in-memory PGlite. Fixture: the shipped restart-loop flow; answering "Boots to the lock
// screen and stays up" at its first step reaches the verdict no-restart-on-bench, whose repair
// markdown has three "- [ ]" items (quoted from flows/restart-loop-after-liquid.flow.yaml).
const FLOW = 'restart-loop-after-liquid';
const flowFile = `${FLOW}.flow.yaml`;
const tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-checklists-'));
let tech: { id: string };
let n = 0;

/** Invented test IMEIs: "00" bodies (test reporting body, from memory), check digit computed. */
const imei = (body14: string) => `${body14}${imeiCheckDigit(body14)}`;

/** A job whose run reached its verdict, moved on to `repairing` as after an approved quote. */
async function repairingJob() {
	const job = await jobs.create(
		tech.id,
		makeJobIntake().parse({
			customerName: 'Odile Fenwright',
			customerPhone: '+00 555 0142',
			maker: 'Corvana',
			model: 'Tern 5',
			imei: imei(`0033000000${String(++n).padStart(4, '0')}`),
			symptoms: ['restart-loop'],
			liquid: 'fresh',
			submerged: false,
			passcodeStatus: 'given',
			consentToOpen: true
		})
	);
	const run = await runs.start(job.id, FLOW, tech);
	await recordEvent(
		run.id,
		{
			type: 'ANSWER',
			stepId: 'power-on-as-received',
			outcome: 'Boots to the lock screen and stays up',
			idempotencyKey: `chk-${n}-${Math.random()}`
		},
		tech
	);
	await jobs.transition(job.id, 'awaiting-approval', tech.id);
	await jobs.transition(job.id, 'repairing', tech.id);
	return { job, run };
}

const allPass = () =>
	Object.fromEntries(FUNCTION_TESTS.map((t) => [t.key, { result: 'pass' as const, note: '' }]));

beforeAll(async () => {
	tech = await staff.create(null, {
		name: 'Pim Ashgrove',
		email: 'pim@shop.test',
		role: 'technician',
		password: 'tech-password-1'
	});
	fs.writeFileSync(path.join(tmp, flowFile), fs.readFileSync(path.resolve('flows', flowFile), 'utf8'));
	await library.importFromFiles(tmp);
});

afterAll(() => fs.rmSync(tmp, { recursive: true, force: true }));

describe('repairItems', () => {
	it('takes top-level "- [ ]" and "- " items as plain labels, joins wrapped lines, keeps nested lists inside', () => {
		const md =
			'Before you start:\n\n- [ ] Clean the **board** with\n      isopropyl alcohol\n- Replace the `flex`\n  - check the latch\n\nNot an item.';
		expect(repairItems(md)).toEqual([
			{ key: 'r1', label: 'Clean the board with isopropyl alcohol' },
			{ key: 'r2', label: 'Replace the flex' }
		]);
		expect(repairItems('')).toEqual([]);
	});

	it('keeps the eighteen original function-test keys (saved results refer to them) among the new ones', () => {
		expect(FUNCTION_TESTS.map((t) => t.label)).toContain('Ambient-light sensing');
		const keys = FUNCTION_TESTS.map((t) => t.key);
		for (const key of [
			'boot',
			'display',
			'touch',
			'front-camera',
			'rear-camera',
			'face-unlock',
			'earpiece',
			'proximity',
			'ambient-light',
			'microphones',
			'loudspeaker',
			'wired-charging',
			'wireless-charging',
			'buttons',
			'vibration',
			'cellular',
			'wifi',
			'bluetooth'
		])
			expect(keys).toContain(key);
		expect(new Set(keys).size).toBe(keys.length);
		expect(keys).toEqual(
			expect.arrayContaining(['fingerprint', 'nfc', 'positioning', 'sim', 'standby-drain'])
		);
	});
});

describe('checklists of a job', () => {
	it('reads the repair items from the verdict of the completed run', async () => {
		const { job, run } = await repairingJob();
		const view = await checklists.forJob(job.id);
		expect(view!.run.id).toBe(run.id);
		expect(view!.verdict.title).toBe('No restart seen on the bench');
		expect(view!.repair.map((i) => i.label)).toEqual([
			'Note how long the phone ran on the bench without restarting (at least 5 minutes).',
			'With the customer present or with their consent and unlock, use the front camera, face unlock and a call (earpiece and proximity sensing): some restarts only come when a sensor is used. Leave the charge port alone until it has been seen to be dry.',
			'Offer a preventive clean inside the phone; opening it breaks the factory adhesive seal, so quote new adhesive and seals with it.'
		]);
		expect(view!.repair.every((i) => i.result === null)).toBe(true);
	});

	it('moves the job to testing once every repair item is done, audited', async () => {
		const { job } = await repairingJob();
		expect(await checklists.saveRepair(job.id, ['r1'], tech.id)).toEqual({ moved: null, complete: false });
		expect((await jobs.get(job.id))!.status).toBe('repairing');
		expect(await checklists.saveRepair(job.id, ['r1', 'r2', 'r3'], tech.id)).toEqual({
			moved: 'testing',
			complete: true
		});
		expect((await jobs.get(job.id))!.status).toBe('testing');
		const db = await getDb();
		const audit = await db.select().from(auditLog).where(eq(auditLog.targetId, job.id));
		expect(audit.filter((a) => a.action === 'checklist.repair')).toHaveLength(2);
		expect((await checklists.forJob(job.id))!.repair.map((i) => i.result)).toEqual(['done', 'done', 'done']);
	});

	it('a function-test fail reopens the job for diagnosis', async () => {
		const { job } = await repairingJob();
		await checklists.saveRepair(job.id, ['r1', 'r2', 'r3'], tech.id);
		const input = { ...allPass(), 'face-unlock': { result: 'fail' as const, note: ' no dots ' } };
		expect(await checklists.saveFunctionTest(job.id, input, tech.id)).toMatchObject({ moved: 'diagnosing' });
		const detail = await jobs.get(job.id);
		expect(detail!.status).toBe('diagnosing');
		const saved = (await checklists.forJob(job.id))!.functionTest.find((i) => i.key === 'face-unlock');
		expect(saved).toMatchObject({ result: 'fail', note: 'no dots' });
	});

	it('a complete function test without a fail (not tested allowed) makes the job ready; a partial one does not', async () => {
		const { job } = await repairingJob();
		await checklists.saveRepair(job.id, ['r1', 'r2', 'r3'], tech.id);
		const partial = allPass() as Record<string, { result: 'pass' | 'not-tested' | null; note: string }>;
		partial.bluetooth = { result: null, note: '' };
		expect(await checklists.saveFunctionTest(job.id, partial, tech.id)).toEqual({
			moved: null,
			complete: false
		});
		expect((await jobs.get(job.id))!.status).toBe('testing');
		const full = {
			...allPass(),
			'wireless-charging': { result: 'not-tested' as const, note: 'no coil fitted' }
		};
		expect(await checklists.saveFunctionTest(job.id, full, tech.id)).toEqual({
			moved: 'ready',
			complete: true
		});
		expect((await jobs.get(job.id))!.status).toBe('ready');
	});

	it('stores the verdict confirmation and refreshes the insight facts; "no" needs a note', async () => {
		const { job, run } = await repairingJob();
		const e = await checklists
			.confirmVerdict(job.id, { confirmed: false, note: '  ' }, tech.id)
			.catch((x) => x);
		expect(e).toBeInstanceOf(RuleError);
		expect((e as RuleError).field).toBe('note');
		const db = await getDb();
		expect(
			await db.select().from(verdictConfirmations).where(eq(verdictConfirmations.runId, run.id))
		).toEqual([]);

		await checklists.confirmVerdict(
			job.id,
			{ confirmed: false, note: 'Restarts came from the battery' },
			tech.id
		);
		const [fact] = await db.select().from(insightRunFacts).where(eq(insightRunFacts.runId, run.id));
		expect(fact).toMatchObject({ confirmed: false, confirmationNote: 'Restarts came from the battery' });
		await checklists.confirmVerdict(job.id, { confirmed: true, note: '' }, tech.id);
		expect((await checklists.forJob(job.id))!.confirmation).toMatchObject({ confirmed: true });
	});

	it('refuses a job without a verdict and an unknown job', async () => {
		const job = await jobs.create(
			tech.id,
			makeJobIntake().parse({
				customerName: 'Odile Fenwright',
				customerPhone: '+00 555 0142',
				maker: 'Corvana',
				model: 'Tern 5',
				imei: imei('00339999000001'),
				symptoms: ['restart-loop'],
				liquid: 'fresh',
				submerged: false,
				passcodeStatus: 'given'
			})
		);
		expect(await checklists.forJob(job.id)).toBeUndefined();
		const e = await checklists.saveRepair(job.id, [], tech.id).catch((x) => x);
		expect((e as RuleError).code).toBe('no-verdict');
		const e2 = await checklists
			.saveRepair('00000000-0000-4000-8000-000000000000', [], tech.id)
			.catch((x) => x);
		expect((e2 as RuleError).code).toBe('not-found');
	});
});
