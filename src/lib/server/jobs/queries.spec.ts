// Over 300 lines on purpose: a spec: the job queries' rules on a real database.
import { beforeAll, describe, expect, it } from 'vitest';
import { eq, sql } from 'drizzle-orm';
import { getDb } from '$lib/server/db';
import { auditLog } from '$lib/server/db/schema';
import { jobEvents, jobs as jobsTable } from '$lib/server/db/schema/jobs';
import { imeiCheckDigit } from '$lib/domain/identifiers';
import * as staff from '$lib/server/staff/queries';
import { makeJobIntake, type JobIntake } from '$lib/schemas/job';
import * as jobs from './queries';
import * as deviceModels from './device-models';

// Real in-memory PGlite migrated from drizzle/ (DATA_DIR=memory:// in vite.config.ts).
let techId: string;
let leadId: string;

/** Invented test IMEIs: "00" bodies (test reporting body, from memory), check digit computed. */
const imei = (body14: string) => `${body14}${imeiCheckDigit(body14)}`;

function intake(over: Partial<JobIntake> = {}): JobIntake {
	return makeJobIntake().parse({
		customerName: 'Wren Atherley',
		customerEmail: 'wren@example.test',
		maker: 'Corvana',
		model: 'Tern 6',
		imei: imei('00110000000001'),
		symptoms: ['no-power'],
		liquid: 'fresh',
		submerged: false,
		passcodeStatus: 'withheld',
		...over
	});
}

beforeAll(async () => {
	leadId = (
		await staff.create(null, {
			name: 'Lia Moorcroft',
			email: 'lia@shop.test',
			role: 'lead',
			password: 'lead-password-1'
		})
	).id;
	techId = (
		await staff.create(leadId, {
			name: 'Owen Strand',
			email: 'owen@shop.test',
			role: 'technician',
			password: 'tech-password-1'
		})
	).id;
});

describe('job intake', () => {
	it('creates a job with a TM number, normalised identifier, stored assessment, history row and audit record', async () => {
		const raw = imei('00110000000001');
		const typed = `${raw.slice(0, 2)}-${raw.slice(2, 8)} ${raw.slice(8)}`;
		const job = await jobs.create(
			techId,
			intake({ imei: typed, ratingCode: 'ip67', submerged: true, depthM: 2, minutes: 10 })
		);
		expect(job.imei).toBe(imei('00110000000001'));
		expect(jobs.formatJobNumber(job.number)).toMatch(/^TM-\d{6}$/);
		expect(job.status).toBe('received');
		expect(job.rating).toEqual({ code: 'IP67' });
		// 2 m is deeper than IP67's 1 m test depth (IEC 60529 second digit 7, trade-reference §1).
		expect(job.exposureAssessment).toMatchObject({ status: 'exceeded', reasons: ['depth'] });
		expect(job.consentToOpen).toBe(false);
		expect(job.consentAt).toBeNull();

		const detail = await jobs.get(job.id);
		expect(detail!.customer).toMatchObject({
			name: 'Wren Atherley',
			email: 'wren@example.test',
			phone: null
		});
		expect(detail!.history).toEqual([
			expect.objectContaining({ fromStatus: null, toStatus: 'received', byName: 'Owen Strand' })
		]);
		expect(detail!.next).toEqual(['diagnosing', 'cancelled']);

		const db = await getDb();
		const audit = await db.select().from(auditLog).where(eq(auditLog.targetId, job.id));
		expect(audit.map((a) => a.action)).toEqual(['job.create']);
	});

	it('stores the test-condition answers and judges a warm, soapy, moving immersion outside the test conditions', async () => {
		const job = await jobs.create(
			techId,
			intake({
				imei: imei('00110000000019'),
				ratingCode: 'IP67',
				submerged: true,
				depthM: 0.3,
				minutes: 5,
				liquidTemperature: 'warm',
				waterMotion: 'moving',
				soapy: true
			})
		);
		const [row] = await (await getDb()).select().from(jobsTable).where(eq(jobsTable.id, job.id));
		expect(row).toMatchObject({ liquidTemperature: 'warm', waterMotion: 'moving', soapy: true });
		// IEC 60529 digit 7: fresh water within 5 K of the specimen, specimen at rest (trade-reference §9).
		expect(row.exposureAssessment).toMatchObject({
			status: 'outside-test-conditions',
			reasons: ['detergent', 'temperature', 'motion']
		});
	});

	it('defaults the test conditions to still water at room temperature, and drops soap for a liquid other than fresh water', async () => {
		const job = await jobs.create(
			techId,
			intake({ imei: imei('00110000000027'), liquid: 'salt', soapy: true, ratingCode: 'IP69' })
		);
		expect(job).toMatchObject({ liquidTemperature: 'room', waterMotion: 'still', soapy: false });
		const deep = await jobs.create(
			techId,
			intake({ imei: imei('00110000000035'), ratingCode: 'IP69', submerged: true, depthM: 0.2, minutes: 1 })
		);
		// Second digit 9 is a jet test, never an immersion rating (IEC 60529 amendment 2, via trade-reference §9).
		expect(deep.exposureAssessment).toMatchObject({ status: 'exceeded', reasons: ['no-immersion-rating'] });
	});

	it('numbers jobs from a sequence, one up each time', async () => {
		const a = await jobs.create(techId, intake());
		const b = await jobs.create(techId, intake());
		expect(b.number).toBe(a.number + 1);
	});

	it('stores consent with its time, and a serial in upper case without spaces when there is no IMEI', async () => {
		const job = await jobs.create(techId, intake({ imei: '', serial: ' nb3k 7q2x ', consentToOpen: true }));
		expect(job.serial).toBe('NB3K7Q2X');
		expect(job.imei).toBeNull();
		expect(job.consentAt).toBeInstanceOf(Date);
	});

	it('has no column that could hold a passcode', async () => {
		const db = await getDb();
		const { rows } = await db.execute<{ column_name: string }>(
			sql`select column_name from information_schema.columns where table_name in ('jobs', 'customers', 'job_events')`
		);
		const names = rows.map((r) => r.column_name);
		expect(names).toContain('passcode_status');
		expect(names.filter((n) => /pass|pin|secret|unlock/i.test(n) && n !== 'passcode_status')).toEqual([]);
	});

	it('the database itself refuses a job without any identifier or with a malformed IMEI', async () => {
		const db = await getDb();
		const [job] = await db.select().from(jobsTable).limit(1);
		await expect(
			db.update(jobsTable).set({ imei: null, serial: null }).where(eq(jobsTable.id, job.id))
		).rejects.toThrow();
		await expect(
			db.update(jobsTable).set({ imei: '12345' }).where(eq(jobsTable.id, job.id))
		).rejects.toThrow();
		await expect(db.execute(sql`update jobs set status = 'lost' where id = ${job.id}`)).rejects.toThrow();
	});
});

describe('job list', () => {
	let ids: { salt: string; brook: string; assigned: string };

	beforeAll(async () => {
		const salt = await jobs.create(
			techId,
			intake({
				customerName: 'Perpetua Szell',
				customerEmail: '',
				customerPhone: '+44 20 7946 0555',
				liquid: 'salt',
				model: 'Tern 6 Pro',
				imei: imei('00229999888877')
			})
		);
		const brook = await jobs.create(
			techId,
			intake({
				customerName: 'Ambrose Kettle',
				maker: 'Nomi Devices',
				model: 'Brook 3',
				imei: '',
				serial: 'BRK-42_%'
			})
		);
		const assigned = await jobs.create(techId, intake({ customerName: 'Zelda 100% Quist' }));
		await jobs.assignTechnician(assigned.id, techId, leadId);
		ids = { salt: salt.id, brook: brook.id, assigned: assigned.id };
	});

	const base = { q: '', sort: 'createdAt', dir: 'desc', page: 1, size: 20 } as const;

	it('searches customer name, phone digits, maker and model, IMEI digits, serial and job number', async () => {
		expect((await jobs.list({ ...base, q: 'szell' })).rows.map((r) => r.id)).toEqual([ids.salt]);
		expect((await jobs.list({ ...base, q: '7946 0555' })).rows.map((r) => r.id)).toEqual([ids.salt]);
		expect((await jobs.list({ ...base, q: 'nomi devices brook' })).rows.map((r) => r.id)).toEqual([
			ids.brook
		]);
		expect((await jobs.list({ ...base, q: '0022-9999' })).rows.map((r) => r.id)).toEqual([ids.salt]);
		expect((await jobs.list({ ...base, q: 'brk42' })).rows.map((r) => r.id)).toEqual([ids.brook]);
		const salt = await jobs.get(ids.salt);
		const byNumber = await jobs.list({ ...base, q: jobs.formatJobNumber(salt!.number) });
		expect(byNumber.rows.map((r) => r.id)).toEqual([ids.salt]);
	});

	it('treats % and _ in the search as plain characters', async () => {
		expect((await jobs.list({ ...base, q: '100%' })).rows.map((r) => r.id)).toEqual([ids.assigned]);
		expect((await jobs.list({ ...base, q: '_' })).rows.map((r) => r.id)).toEqual([ids.brook]);
	});

	it('filters by status and by technician (or none)', async () => {
		await jobs.transition(ids.brook, 'diagnosing', techId);
		const diagnosing = await jobs.list({ ...base, status: 'diagnosing' });
		expect(diagnosing.rows.map((r) => r.id)).toEqual([ids.brook]);
		const mine = await jobs.list({ ...base, technician: techId });
		expect(mine.rows.map((r) => r.id)).toEqual([ids.assigned]);
		expect(mine.rows[0].technicianName).toBe('Owen Strand');
		const nobody = await jobs.list({ ...base, technician: 'none' });
		expect(nobody.rows.map((r) => r.id)).not.toContain(ids.assigned);
		expect(nobody.total).toBe((await jobs.count()) - 1);
	});

	it('sorts in the database, both directions', async () => {
		const asc = await jobs.list({ ...base, sort: 'customer', dir: 'asc', size: 100 });
		const names = asc.rows.map((r) => r.customerName.toLowerCase());
		expect(names).toEqual([...names].sort());
		const byNumber = await jobs.list({ ...base, sort: 'number', dir: 'asc', size: 100 });
		const numbers = byNumber.rows.map((r) => r.number);
		expect(numbers).toEqual([...numbers].sort((a, b) => a - b));
		const desc = await jobs.list({ ...base, sort: 'number', dir: 'desc', size: 100 });
		expect(desc.rows.map((r) => r.number)).toEqual([...numbers].reverse());
	});

	it('pages without overlap and clamps a page past the end', async () => {
		const total = await jobs.count();
		const p1 = await jobs.list({ ...base, sort: 'number', size: 5, page: 1 });
		const p2 = await jobs.list({ ...base, sort: 'number', size: 5, page: 2 });
		expect(p1.total).toBe(total);
		expect(p1.pages).toBe(Math.ceil(total / 5));
		expect(p1.rows).toHaveLength(5);
		const seen = new Set([...p1.rows, ...p2.rows].map((r) => r.id));
		expect(seen.size).toBe(p1.rows.length + p2.rows.length);
		const far = await jobs.list({ ...base, sort: 'number', size: 5, page: 999 });
		expect(far.page).toBe(far.pages);
		expect(far.rows.length).toBeGreaterThan(0);
	});
});

describe('status transitions', () => {
	it('follows the workflow, writing history and audit for each move', async () => {
		const job = await jobs.create(techId, intake());
		for (const to of [
			'diagnosing',
			'awaiting-approval',
			'repairing',
			'testing',
			'ready',
			'collected'
		] as const) {
			expect((await jobs.transition(job.id, to, techId, `to ${to}`)).status).toBe(to);
		}
		const detail = await jobs.get(job.id);
		expect(detail!.history.map((h) => h.toStatus)).toEqual([
			'received',
			'diagnosing',
			'awaiting-approval',
			'repairing',
			'testing',
			'ready',
			'collected'
		]);
		expect(detail!.history[1]).toMatchObject({ fromStatus: 'received', note: 'to diagnosing' });
		expect(detail!.next).toEqual([]);
		const db = await getDb();
		const audit = await db.select().from(auditLog).where(eq(auditLog.targetId, job.id));
		expect(audit.filter((a) => a.action === 'job.status')).toHaveLength(6);
	});

	it('refuses a move the workflow does not allow, with a clear error and nothing written', async () => {
		const job = await jobs.create(techId, intake());
		const db = await getDb();
		const before = await db.select().from(jobEvents).where(eq(jobEvents.jobId, job.id));
		await expect(jobs.transition(job.id, 'ready', techId)).rejects.toMatchObject({
			code: 'invalid-transition',
			message: expect.stringMatching(/“Received” cannot move to “Ready to collect”.*Diagnosing, Cancelled/)
		});
		expect(await db.select().from(jobEvents).where(eq(jobEvents.jobId, job.id))).toHaveLength(before.length);
		expect((await jobs.get(job.id))!.status).toBe('received');
		await jobs.transition(job.id, 'cancelled', techId, 'Customer took it back');
		await expect(jobs.transition(job.id, 'diagnosing', techId)).rejects.toThrow(/It is closed/);
	});

	it('reports an unknown job as not found', async () => {
		await expect(
			jobs.transition('00000000-0000-4000-8000-000000000000', 'diagnosing', techId)
		).rejects.toMatchObject({ code: 'not-found' });
		await expect(jobs.transition('not-a-uuid', 'diagnosing', techId)).rejects.toMatchObject({
			code: 'not-found'
		});
		expect(await jobs.get('not-a-uuid')).toBeUndefined();
	});

	it('assigns and unassigns a technician, refusing a disabled member', async () => {
		const job = await jobs.create(techId, intake());
		expect((await jobs.assignTechnician(job.id, techId, leadId)).technicianId).toBe(techId);
		expect((await jobs.assignTechnician(job.id, null, leadId)).technicianId).toBeNull();
		const gone = await staff.create(leadId, {
			name: 'Ivo Penrose',
			email: 'ivo@shop.test',
			role: 'technician',
			password: 'ivo-password-1'
		});
		await staff.setDisabled(leadId, gone.id, true);
		await expect(jobs.assignTechnician(job.id, gone.id, leadId)).rejects.toMatchObject({
			code: 'not-a-technician'
		});
	});

	it('records consent given after intake once, with its time', async () => {
		const job = await jobs.create(techId, intake());
		const consented = await jobs.recordConsent(job.id, techId);
		expect(consented.consentToOpen).toBe(true);
		expect(consented.consentAt).toBeInstanceOf(Date);
		expect((await jobs.recordConsent(job.id, techId)).consentAt).toEqual(consented.consentAt);
	});
});

describe('device models and symptoms', () => {
	it('seeds the invented reference models once and searches them', async () => {
		expect(await deviceModels.seedDeviceModels()).toBe(deviceModels.seedModels.length);
		expect(await deviceModels.seedDeviceModels()).toBe(0);
		expect((await deviceModels.search('tern 6')).map(({ maker, model }) => ({ maker, model }))).toEqual([
			{ maker: 'Corvana', model: 'Tern 6' },
			{ maker: 'Corvana', model: 'Tern 6 Pro' }
		]);
		expect(await deviceModels.search('halv')).toHaveLength(2);
		expect(await deviceModels.search('%')).toEqual([]);
	});
});
