import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { imeiCheckDigit } from '$lib/domain/identifiers';
import { FUNCTION_TESTS, functionTestsFor, COULD_NOT_POWER_ON } from '$lib/domain/functionTests';
import * as staff from '$lib/server/staff/queries';
import * as jobs from '$lib/server/jobs/queries';
import * as library from '$lib/server/flows/queries';
import * as runs from '$lib/server/runs/queries';
import { recordEvent } from '$lib/server/runs/commit';
import * as report from '$lib/server/reports/report';
import { capabilitiesOf, seedDeviceModels } from '$lib/server/jobs/device-models';
import { makeJobIntake } from '$lib/schemas/job';
import * as checklists from './queries';
import * as preRepair from './preRepair';

// Real in-memory PGlite; the shipped restart-loop flow reaches its verdict no-restart-on-bench at the
// first answer (as in queries.spec.ts). Device models are the invented demo ones (device-models.ts).
const FLOW = 'restart-loop-after-liquid';
const flowFile = `${FLOW}.flow.yaml`;
const tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-function-test-'));
let tech: { id: string };
let n = 0;

/** Invented test IMEIs: "00" bodies (test reporting body, from memory), check digit computed. */
const imei = (body14: string) => `${body14}${imeiCheckDigit(body14)}`;

function intake(maker: string, model: string) {
	return makeJobIntake().parse({
		customerName: 'Odile Fenwright',
		customerPhone: '+00 555 0142',
		maker,
		model,
		imei: imei(`0034000000${String(++n).padStart(4, '0')}`),
		symptoms: ['restart-loop'],
		liquid: 'fresh',
		submerged: false,
		passcodeStatus: 'given',
		consentToOpen: true
	});
}

/** A job with a verdict, moved through the repair to `testing`. */
async function testingJob(maker: string, model: string, pre: preRepair.PreRepairInput | null = null) {
	const test = pre ? preRepair.build(await preRepair.itemsFor(maker, model), pre, tech.id) : null;
	const job = await jobs.create(tech.id, intake(maker, model), test);
	const run = await runs.start(job.id, FLOW, tech);
	await recordEvent(
		run.id,
		{
			type: 'ANSWER',
			stepId: 'power-on-as-received',
			outcome: 'Boots to the lock screen and stays up',
			idempotencyKey: `ft-${n}-${Math.random()}`
		},
		tech
	);
	await jobs.transition(job.id, 'awaiting-approval', tech.id);
	await jobs.transition(job.id, 'repairing', tech.id);
	await jobs.transition(job.id, 'testing', tech.id);
	return job;
}

const allPass = (keys: string[]) =>
	Object.fromEntries(keys.map((k) => [k, { result: 'pass' as const, note: '' }]));

beforeAll(async () => {
	tech = await staff.create(null, {
		name: 'Pim Ashgrove',
		email: 'pim@shop.test',
		role: 'technician',
		password: 'tech-password-1'
	});
	fs.writeFileSync(path.join(tmp, flowFile), fs.readFileSync(path.resolve('flows', flowFile), 'utf8'));
	await library.importFromFiles(tmp);
	await seedDeviceModels();
});

afterAll(() => fs.rmSync(tmp, { recursive: true, force: true }));

describe('items follow the device', () => {
	it('asks a model only about the functions it declares; an unknown model gets every item', async () => {
		const brook = functionTestsFor(await capabilitiesOf('nomi devices', 'BROOK 3'), 'after').map(
			(t) => t.key
		);
		expect(brook).not.toContain('nfc');
		expect(brook).not.toContain('fingerprint');
		expect(brook).not.toContain('rear-camera-2');
		expect(brook).toEqual(expect.arrayContaining(['rear-camera', 'wired-audio', 'sim', 'standby-drain']));
		const pro = functionTestsFor(await capabilitiesOf('Corvana', 'Tern 6 Pro'), 'after').map((t) => t.key);
		expect(pro).toEqual(expect.arrayContaining(['nfc', 'rear-camera-2', 'rear-camera-3', 'face-unlock']));
		expect(pro).not.toContain('fingerprint');
		expect(await capabilitiesOf('Corvana', 'Tern 99')).toBeNull();
		expect(functionTestsFor(null, 'after')).toEqual(FUNCTION_TESTS);
		// Before the repair: the overnight drain and the indicators after the repair are left out.
		const atIntake = functionTestsFor(null, 'before').map((t) => t.key);
		expect(atIntake).not.toContain('standby-drain');
		expect(atIntake).not.toContain('liquid-indicators');
		expect(atIntake).toHaveLength(FUNCTION_TESTS.length - 2);
	});

	it('the checklists of a phone without NFC do not ask about NFC, and refuse an answer for it', async () => {
		const job = await testingJob('Nomi Devices', 'Brook 3');
		const view = await checklists.forJob(job.id);
		const keys = view!.functionTest.map((i) => i.key);
		expect(keys).not.toContain('nfc');
		expect(keys).toContain('usb-data');
		await expect(
			checklists.saveFunctionTest(job.id, { nfc: { result: 'pass', note: '' } }, tech.id)
		).rejects.toMatchObject({ code: 'invalid-input', message: 'Unknown test: nfc.' });
		const unknown = await testingJob('Corvana', 'Tern 99');
		expect((await checklists.forJob(unknown.id))!.functionTest.map((i) => i.key)).toEqual(
			FUNCTION_TESTS.map((t) => t.key)
		);
	});
});

describe('pre-repair test', () => {
	it('is stored at intake, editable until the repair starts, and "could not power on" marks all not tested', async () => {
		const job = await jobs.create(
			tech.id,
			intake('Halvard', 'Skerry S'),
			preRepair.build(
				await preRepair.itemsFor('Halvard', 'Skerry S'),
				preRepair.preRepairInput.parse({
					items: { boot: { result: 'pass' }, loudspeaker: { result: 'fail', note: 'Crackles' } }
				}),
				tech.id
			)
		);
		const stored = (await jobs.get(job.id))!.preRepairTest!;
		expect(stored.couldNotPowerOn).toBe(false);
		expect(stored.items.find((i) => i.key === 'boot')!.result).toBe('pass');
		expect(stored.items.find((i) => i.key === 'loudspeaker')).toMatchObject({
			result: 'fail',
			note: 'Crackles'
		});
		expect(stored.items.find((i) => i.key === 'touch')!.result).toBe('not-tested');
		expect(stored.items.map((i) => i.key)).not.toContain('nfc'); // Skerry S has none

		const off = await preRepair.save(
			job.id,
			{ couldNotPowerOn: true, items: { boot: { result: 'pass', note: '' } } },
			tech.id
		);
		expect(off.items.every((i) => i.result === 'not-tested' && i.note === COULD_NOT_POWER_ON)).toBe(true);

		await jobs.transition(job.id, 'diagnosing', tech.id);
		await jobs.transition(job.id, 'awaiting-approval', tech.id);
		await jobs.transition(job.id, 'repairing', tech.id);
		await expect(
			preRepair.save(job.id, { couldNotPowerOn: false, items: {} }, tech.id)
		).rejects.toMatchObject({
			code: 'repair-started'
		});
		expect((await jobs.get(job.id))!.preRepairTest!.couldNotPowerOn).toBe(true);
	});

	it('reads the intake form fields, and is absent when the section was not in the form', () => {
		const form = new FormData();
		expect(preRepair.fromForm(form)).toBeNull();
		form.set('pre-present', '1');
		form.set('pre-result-boot', 'fail');
		form.set('pre-note-boot', 'Logo, then dark');
		const parsed = preRepair.fromForm(form)!;
		expect(parsed.success && parsed.data).toEqual({
			couldNotPowerOn: false,
			items: { boot: { result: 'fail', note: 'Logo, then dark' } }
		});
		form.set('pre-result-boot', 'maybe');
		expect(preRepair.fromForm(form)!.success).toBe(false);
	});

	it('shows on the report before and after, per function, in both cuts', async () => {
		const job = await testingJob('Corvana', 'Tern 5', {
			couldNotPowerOn: false,
			items: {
				boot: { result: 'pass', note: '' },
				loudspeaker: { result: 'fail', note: 'Muffled' },
				wifi: { result: 'pass', note: '' }
			}
		});
		const keys = (await checklists.forJob(job.id))!.functionTest.map((i) => i.key);
		await checklists.saveFunctionTest(
			job.id,
			{ ...allPass(keys), sim: { result: 'not-tested', note: 'No SIM card came with the phone' } },
			tech.id
		);
		const customer = (await report.build(job.id, 'customer'))!.functionTest!;
		const row = (key: string) => customer.rows.find((r) => r.key === key);
		expect(row('loudspeaker')).toMatchObject({ before: 'fail', after: 'pass', note: '' });
		expect(row('boot')).toMatchObject({ before: 'pass', after: 'pass' });
		expect(row('touch')).toMatchObject({ before: 'not-tested', after: 'pass' });
		expect(row('standby-drain')).toMatchObject({ before: null, after: 'pass' });
		expect(row('sim')).toMatchObject({ after: 'not-tested', note: 'No SIM card came with the phone' });
		expect(row('nfc')).toBeUndefined(); // Tern 5 has no NFC
		const staffCut = (await report.build(job.id, 'staff'))!.functionTest!;
		expect(staffCut.rows.find((r) => r.key === 'loudspeaker')!.note).toBe('Before: Muffled');
		// A job with neither test has no function-test section.
		const bare = await jobs.create(tech.id, intake('Corvana', 'Tern 5'));
		expect((await report.build(bare.id, 'customer'))!.functionTest).toBeNull();
	});
});

describe('ready gate', () => {
	it('refuses ready while items are not tested without a reason, naming them, then passes with reasons', async () => {
		const job = await testingJob('Nomi Devices', 'Brook 3');
		const keys = (await checklists.forJob(job.id))!.functionTest.map((i) => i.key);
		const answers = {
			...allPass(keys),
			sim: { result: 'not-tested' as const, note: '' },
			'standby-drain': { result: 'not-tested' as const, note: '  ' }
		};
		const held = await checklists.saveFunctionTest(job.id, answers, tech.id);
		expect(held).toMatchObject({
			moved: null,
			complete: true,
			untested: ['SIM detected', 'Overnight standby drain']
		});
		expect(held.message).toMatch(/cannot be ready to collect.*SIM detected, Overnight standby drain/);
		expect((await jobs.get(job.id))!.status).toBe('testing');
		await expect(jobs.transition(job.id, 'ready', tech.id)).rejects.toMatchObject({
			code: 'untested',
			message: expect.stringMatching(/SIM detected, Overnight standby drain\. Test them, or give a reason/)
		});

		const withReasons = {
			...answers,
			sim: { result: 'not-tested' as const, note: 'No SIM card came with the phone' },
			'standby-drain': { result: 'not-tested' as const, note: 'Customer collects the same day' }
		};
		expect(await checklists.saveFunctionTest(job.id, withReasons, tech.id)).toMatchObject({ moved: 'ready' });
		expect((await jobs.get(job.id))!.status).toBe('ready');
	});

	it('a repaired job with no after-repair test at all needs a reason on the move', async () => {
		// No run: moved by hand through the workflow, so no checklist could hold a test.
		const bare = await jobs.create(tech.id, intake('Nomi Devices', 'Brook 3'));
		for (const to of ['diagnosing', 'awaiting-approval', 'repairing', 'testing'] as const)
			await jobs.transition(bare.id, to, tech.id);
		await expect(jobs.transition(bare.id, 'ready', tech.id, '   ')).rejects.toMatchObject({
			code: 'untested',
			message: expect.stringMatching(/no after-repair function test is recorded.*give the reason/)
		});
		expect((await jobs.get(bare.id))!.status).toBe('testing');
		const moved = await jobs.transition(bare.id, 'ready', tech.id, 'Customer took it back the same hour');
		expect(moved.status).toBe('ready');

		// A verdict but the function test never saved: the same rule, not a list of every item.
		const job = await testingJob('Nomi Devices', 'Brook 3');
		await expect(jobs.transition(job.id, 'ready', tech.id)).rejects.toMatchObject({
			code: 'untested',
			message: expect.stringMatching(/no after-repair function test is recorded/)
		});
		expect((await jobs.transition(job.id, 'ready', tech.id, 'Customer declined the test')).status).toBe(
			'ready'
		);
	});

	it('once a test is saved, a reason on the move does not stand in for its items', async () => {
		const job = await testingJob('Nomi Devices', 'Brook 3');
		const keys = (await checklists.forJob(job.id))!.functionTest.map((i) => i.key);
		const partial = { ...allPass(keys), sim: { result: null, note: '' } };
		const saved = await checklists.saveFunctionTest(job.id, partial, tech.id);
		expect(saved).toMatchObject({ moved: null, complete: false });
		await expect(jobs.transition(job.id, 'ready', tech.id, 'All good')).rejects.toMatchObject({
			code: 'untested',
			message: expect.stringMatching(/this item is not tested and has no reason: SIM detected\./)
		});
		expect((await jobs.get(job.id))!.status).toBe('testing');
	});

	it('a job sent back unrepaired (quote declined) is not held by a test it never had', async () => {
		const job = await jobs.create(tech.id, intake('Nomi Devices', 'Brook 3'));
		await jobs.transition(job.id, 'diagnosing', tech.id);
		await jobs.transition(job.id, 'awaiting-approval', tech.id);
		expect((await jobs.transition(job.id, 'ready', tech.id)).status).toBe('ready');
	});
});
