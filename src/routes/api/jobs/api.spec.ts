import { beforeAll, describe, expect, it } from 'vitest';
import { imeiCheckDigit } from '$lib/domain/identifiers';
import * as staff from '$lib/server/staff/queries';
import { GET as listJobs, POST as createJob } from './+server';
import type { DeviceModelsResponse, JobCreatedResponse, JobListResponse } from '$lib/jobs/api-types';
import { GET as getJob, PATCH as patchJob, type JobResponse } from './[id]/+server';
import { GET as getModels } from '../device-models/+server';
import { seedDeviceModels } from '$lib/server/jobs/device-models';

// The handlers are called directly with a minimal RequestEvent against the in-memory PGlite.
type User = { id: string; name: string; email: string; role: 'technician' | 'senior' | 'lead' };
let tech: User;

function event(
	path: string,
	init: RequestInit & { user?: User | null; params?: Record<string, string> } = {}
) {
	const url = new URL(`http://shop.test${path}`);
	const { user = tech, params = {}, ...req } = init;
	// Only the parts of a RequestEvent the handlers read; each handler's own event type is wider.
	return {
		url,
		request: new Request(url, req),
		locals: { user },
		params,
		route: { id: url.pathname.startsWith('/api/jobs/') ? '/api/jobs/[id]' : url.pathname }
	} as unknown as Parameters<typeof createJob>[0] & Parameters<typeof getJob>[0];
}

const json = (body: unknown, method = 'POST') => ({
	method,
	body: JSON.stringify(body),
	headers: { 'content-type': 'application/json' }
});

/** Invented test IMEI ("00" body, check digit computed with the module under test's sibling). */
const goodImei = `00330000000042${imeiCheckDigit('00330000000042')}`;
const badImei = `00330000000042${(imeiCheckDigit('00330000000042') + 1) % 10}`;

const valid = {
	customerName: 'Hester Vale',
	customerPhone: '+44 20 7946 0999',
	maker: 'Halvard',
	model: 'Skerry S Max',
	imei: goodImei,
	symptoms: ['not-charging'],
	liquid: 'fresh',
	exposedAt: '2026-01-05T09:30:00Z',
	submerged: true,
	depthM: 0.5,
	minutes: 5,
	ratingCode: 'IP68',
	declaredDepthM: 4,
	declaredMinutes: 30,
	passcodeStatus: 'not-needed',
	consentToOpen: true
};

async function errorStatus(run: () => unknown) {
	try {
		await run();
	} catch (e) {
		return (e as { status?: number }).status;
	}
	return 200;
}

beforeAll(async () => {
	const t = await staff.create(null, {
		name: 'Rosa Quint',
		email: 'rosa@shop.test',
		role: 'technician',
		password: 'rosa-password-1'
	});
	tech = { id: t.id, name: t.name, email: t.email, role: 'technician' };
	await seedDeviceModels();
});

describe('POST /api/jobs', () => {
	it('creates a job from valid JSON (201, TM number, Location)', async () => {
		const res = await createJob(event('/api/jobs', json(valid)));
		expect(res.status).toBe(201);
		const body = (await res.json()) as JobCreatedResponse;
		expect(body.jobNumber).toMatch(/^TM-\d{6}$/);
		expect(res.headers.get('location')).toBe(`/api/jobs/${body.id}`);
		const detail = (await (
			await getJob(event(`/api/jobs/${body.id}`, { params: { id: body.id } }))
		).json()) as JobResponse;
		// 0.5 m for 5 min is inside the declared 4 m / 30 min of this IP68 rating, fresh water (IEC 60529 digit 8).
		expect(detail.exposureAssessment.status).toBe('within');
		expect(detail.exposedAt).toBe('2026-01-05T09:30:00.000Z');
		expect(detail).not.toHaveProperty('passcode');
	});

	it('answers 400 with field issues: wrong check digit, no contact, submerged without depth, unknown symptom', async () => {
		const res = await createJob(
			event(
				'/api/jobs',
				json({ ...valid, imei: badImei, customerPhone: '', depthM: undefined, symptoms: ['made-up-tag'] })
			)
		);
		expect(res.status).toBe(400);
		const body = (await res.json()) as { message: string; issues: { path: string; message: string }[] };
		const paths = body.issues.map((i) => i.path);
		expect(paths).toEqual(expect.arrayContaining(['imei', 'customerEmail', 'depthM', 'symptoms']));
		expect(body.issues.find((i) => i.path === 'imei')!.message).toMatch(/check digit/);
	});

	it('never assumes a passcode status or a liquid: missing or null is a 400 at that field', async () => {
		for (const missing of [
			{ passcodeStatus: undefined, liquid: undefined },
			{ passcodeStatus: null, liquid: null }
		]) {
			const res = await createJob(event('/api/jobs', json({ ...valid, ...missing })));
			expect(res.status).toBe(400);
			const body = (await res.json()) as { issues: { path: string }[] };
			expect(body.issues.map((i) => i.path)).toEqual(expect.arrayContaining(['passcodeStatus', 'liquid']));
		}
	});

	it('answers 400 for a body that is not JSON, and 400 for an IP68 declaration no stricter than IP67', async () => {
		expect((await createJob(event('/api/jobs', { method: 'POST', body: 'not json' }))).status).toBe(400);
		// IEC 60529: digit 8 must be harsher than digit 7's 1 m for 30 min.
		const res = await createJob(
			event('/api/jobs', json({ ...valid, declaredDepthM: 1, declaredMinutes: 30 }))
		);
		expect(res.status).toBe(400);
		expect(((await res.json()) as { issues: { path: string }[] }).issues[0].path).toBe('declaredDepthM');
	});

	it('accepts IP68 without a declaration and stores "undetermined"', async () => {
		const res = await createJob(
			event('/api/jobs', json({ ...valid, declaredDepthM: undefined, declaredMinutes: undefined }))
		);
		expect(res.status).toBe(201);
		const { id } = (await res.json()) as JobCreatedResponse;
		const detail = (await (await getJob(event(`/api/jobs/${id}`, { params: { id } }))).json()) as JobResponse;
		expect(detail.exposureAssessment.status).toBe('undetermined');
	});

	it('takes the test-condition answers: a hot jet is outside the test conditions; an unknown band is a 400', async () => {
		const res = await createJob(
			event(
				'/api/jobs',
				json({
					...valid,
					customerName: 'Ines Quarrow',
					liquidTemperature: 'hot',
					waterMotion: 'jet',
					soapy: false
				})
			)
		);
		expect(res.status).toBe(201);
		const { id } = (await res.json()) as JobCreatedResponse;
		const detail = (await (await getJob(event(`/api/jobs/${id}`, { params: { id } }))).json()) as JobResponse;
		expect(detail).toMatchObject({ liquidTemperature: 'hot', waterMotion: 'jet', soapy: false });
		// IEC 60529 digits 7/8: fresh water within 5 K of the specimen, specimen at rest (trade-reference §9).
		expect(detail.exposureAssessment).toMatchObject({
			status: 'outside-test-conditions',
			reasons: ['temperature', 'motion']
		});
		const bad = await createJob(event('/api/jobs', json({ ...valid, liquidTemperature: 'boiling' })));
		expect(bad.status).toBe(400);
		expect(((await bad.json()) as { issues: { path: string }[] }).issues[0].path).toBe('liquidTemperature');
	});

	it('refuses a signed-out caller with 401', async () => {
		expect(await errorStatus(() => createJob(event('/api/jobs', { ...json(valid), user: null })))).toBe(401);
		expect(await errorStatus(() => listJobs(event('/api/jobs', { user: null })))).toBe(401);
	});
});

describe('GET /api/jobs', () => {
	it('lists with search and paging; bad query values fall back to defaults', async () => {
		const res = await listJobs(event('/api/jobs?q=hester&size=5&sort=bogus&page=-3'));
		const body = (await res.json()) as JobListResponse;
		expect(body.page).toBe(1);
		expect(body.size).toBe(5);
		expect(body.rows.every((r) => r.customerName === 'Hester Vale')).toBe(true);
		expect(body.total).toBe(2);
		expect(typeof body.rows[0].createdAt).toBe('string');
	});
});

describe('PATCH /api/jobs/:id', () => {
	let id: string;
	beforeAll(async () => {
		id = ((await (await createJob(event('/api/jobs', json(valid)))).json()) as JobCreatedResponse).id;
	});
	const patch = (body: unknown, jobId = id) =>
		patchJob(event(`/api/jobs/${jobId}`, { ...json(body, 'PATCH'), params: { id: jobId } }));

	it('moves the status along the workflow and answers the updated job', async () => {
		const res = await patch({ status: 'diagnosing', note: 'Opening now' });
		expect(res.status).toBe(200);
		const body = (await res.json()) as JobResponse;
		expect(body.status).toBe('diagnosing');
		expect(body.history.at(-1)).toMatchObject({
			fromStatus: 'received',
			toStatus: 'diagnosing',
			note: 'Opening now'
		});
	});

	it('answers 409 for a move the workflow forbids', async () => {
		const res = await patch({ status: 'collected' });
		expect(res.status).toBe(409);
		expect(((await res.json()) as { message: string }).message).toMatch(/cannot move to “Collected”/);
	});

	it('assigns a technician; 400 for an unknown field or two changes at once; 404 for an unknown job', async () => {
		const res = await patch({ technicianId: tech.id });
		expect(((await res.json()) as JobResponse).technicianName).toBe('Rosa Quint');
		expect((await patch({ passcode: '1234' })).status).toBe(400);
		expect((await patch({ status: 'repairing', technicianId: null })).status).toBe(400);
		expect((await patch({ status: 'diagnosing' }, '00000000-0000-4000-8000-000000000000')).status).toBe(404);
	});

	it('GET answers 404 for an unknown job', async () => {
		const missing = '00000000-0000-4000-8000-000000000000';
		expect(await errorStatus(() => getJob(event(`/api/jobs/${missing}`, { params: { id: missing } })))).toBe(
			404
		);
	});
});

describe('GET /api/device-models', () => {
	it('suggests the invented reference models, filtered by q', async () => {
		const all = (await (await getModels(event('/api/device-models'))).json()) as DeviceModelsResponse;
		expect(all.models).toHaveLength(6);
		const some = (await (
			await getModels(event('/api/device-models?q=skerry'))
		).json()) as DeviceModelsResponse;
		expect(some.models.map((m) => m.model)).toEqual(['Skerry S', 'Skerry S Max']);
		expect((await getModels(event(`/api/device-models?q=${'x'.repeat(101)}`))).status).toBe(400);
	});
});
