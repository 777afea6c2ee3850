import fs from 'node:fs';
import path from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { z } from 'zod';
import { Validator } from '@seriousme/openapi-schema-validator';
import { imeiCheckDigit } from '$lib/domain/identifiers';
import * as staff from '$lib/server/staff/queries';
import { jobListQuery, jobPatch, makeJobIntake } from '$lib/schemas/job';
import { dataOutcomeInput } from '$lib/schemas/data-outcome';
import { runAbandonInput, runEventInput, runStartInput } from '$lib/schemas/run';
import { runPhotoUploadFields } from '$lib/photos/api';
import * as answers from '$lib/server/openapi/responses';
import { GET as getDocument } from './+server';
import { GET as listJobs, POST as createJob } from '../jobs/+server';
import { GET as getJob } from '../jobs/[id]/+server';
import { GET as getModels } from '../device-models/+server';

type User = { id: string; name: string; email: string; role: 'technician' | 'senior' | 'lead' };
let tech: User;

function event(url: string, init: RequestInit & { user?: User | null } = {}) {
	const u = new URL(`http://shop.test${url}`);
	const { user = tech, ...req } = init;
	const id = /\/api\/jobs\/([^/]+)$/.exec(u.pathname)?.[1];
	return {
		url: u,
		request: new Request(u, req),
		locals: { user },
		params: id ? { id } : {},
		route: { id: u.pathname }
	} as never; // only the parts of a RequestEvent the handlers read
}

type Operation = {
	parameters?: { name: string; in: string; schema: unknown }[];
	requestBody?: { content: Record<string, { schema: Record<string, unknown> }> };
	responses: Record<string, unknown>;
};
type Doc = {
	openapi: string;
	paths: Record<string, Record<string, Operation>>;
	security: unknown[];
	components: { securitySchemes: Record<string, { type: string; in: string }> };
};
let doc: Doc;

/** The JSON Schema of a route's zod schema as z.toJSONSchema makes it (the request side). */
const expected = (schema: z.ZodType) => {
	const { $schema, ...rest } = z.toJSONSchema(schema, {
		target: 'draft-2020-12',
		io: 'input',
		unrepresentable: 'any'
	});
	void $schema;
	return rest;
};

beforeAll(async () => {
	const t = await staff.create(null, {
		name: 'Ines Marrowby',
		email: 'ines@shop.test',
		role: 'technician',
		password: 'ines-password-1'
	});
	tech = { id: t.id, name: t.name, email: t.email, role: 'technician' };
	doc = (await (await getDocument(event('/api/openapi.json'))).json()) as Doc;
});

describe('GET /api/openapi.json', () => {
	it('needs a signed-in member of staff (401 without a session)', async () => {
		await expect(getDocument(event('/api/openapi.json', { user: null }))).rejects.toMatchObject({
			status: 401
		});
	});

	it('is a valid OpenAPI 3.1 document (checked against the specification’s JSON Schema)', async () => {
		const validator = new Validator();
		const result = await validator.validate(doc as never);
		expect(result.errors ?? []).toEqual([]);
		expect(result.valid).toBe(true);
		expect(validator.version).toBe('3.1');
	});

	it('lists every bench route with the methods its +server.ts exports, and no others', async () => {
		const listed = [
			'/api/jobs',
			'/api/jobs/{id}',
			'/api/jobs/{id}/photos',
			'/api/jobs/{id}/data',
			'/api/runs',
			'/api/runs/{id}',
			'/api/runs/{id}/events',
			'/api/runs/{id}/abandon',
			'/api/runs/{id}/photos',
			'/api/device-models'
		];
		expect(Object.keys(doc.paths).sort()).toEqual([...listed].sort());
		for (const route of listed) {
			const file = path.resolve('src/routes', route.slice(1).replace('{id}', '[id]'), '+server.ts');
			const source = fs.readFileSync(file, 'utf8');
			const exported = [...source.matchAll(/export const (GET|POST|PUT|PATCH|DELETE)\b/g)].map((m) =>
				m[1].toLowerCase()
			);
			const documented = Object.keys(doc.paths[route]).filter((k) => k !== 'parameters');
			expect(documented.sort(), route).toEqual(exported.sort());
		}
	});

	it('describes each request body with z.toJSONSchema of the schema the route parses with', () => {
		const body = (p: string, m: string, type = 'application/json') =>
			doc.paths[p][m].requestBody!.content[type].schema;
		expect(body('/api/jobs', 'post')).toEqual(expected(makeJobIntake()));
		expect(body('/api/jobs/{id}', 'patch')).toEqual(expected(jobPatch));
		expect(body('/api/jobs/{id}/data', 'put')).toEqual(expected(dataOutcomeInput));
		expect(body('/api/runs', 'post')).toEqual(expected(runStartInput));
		expect(body('/api/runs/{id}/events', 'post')).toEqual(expected(runEventInput));
		expect(body('/api/runs/{id}/abandon', 'post')).toEqual(expected(runAbandonInput));
		// Multipart: the route's text fields plus the file part.
		const upload = body('/api/runs/{id}/photos', 'post', 'multipart/form-data') as {
			properties: Record<string, unknown>;
			required: string[];
		};
		const fields = expected(runPhotoUploadFields) as { properties: Record<string, unknown> };
		expect(upload.properties).toMatchObject(fields.properties);
		expect(Object.keys(upload.properties).sort()).toEqual(['file', ...Object.keys(fields.properties)].sort());
		expect(upload.required).toEqual(expect.arrayContaining(['file', 'stepId']));
	});

	it('gives the job list every query parameter of the list schema', () => {
		const params = doc.paths['/api/jobs'].get.parameters!;
		expect(params.map((p) => p.name).sort()).toEqual(Object.keys(jobListQuery.shape).sort());
		expect(params.every((p) => p.in === 'query')).toBe(true);
		const jobId = doc.paths['/api/runs'].get.parameters!.find((p) => p.name === 'jobId');
		expect(jobId).toMatchObject({ required: true, schema: { type: 'string', format: 'uuid' } });
	});

	it('requires the session cookie everywhere and documents 401/403 on every operation', () => {
		expect(doc.security).toEqual([{ session: [] }]);
		expect(doc.components.securitySchemes.session).toMatchObject({ type: 'apiKey', in: 'cookie' });
		for (const [p, item] of Object.entries(doc.paths))
			for (const [m, op] of Object.entries(item)) {
				if (m === 'parameters') continue;
				expect(Object.keys(op.responses), `${m} ${p}`).toEqual(expect.arrayContaining(['401', '403']));
			}
	});
});

describe('answers match their documented schemas', () => {
	const body14 = '00440000000017';
	const intake = {
		customerName: 'Oren Pask',
		customerEmail: 'oren@example.test',
		maker: 'Corvana',
		model: 'Tern 5',
		imei: `${body14}${imeiCheckDigit(body14)}`,
		liquid: 'salt',
		submerged: false,
		passcodeStatus: 'withheld',
		consentToOpen: true
	};
	const post = (body: unknown) => ({
		method: 'POST',
		body: JSON.stringify(body),
		headers: { 'content-type': 'application/json' }
	});

	it('a created job, the job and the job list parse with the response schemas', async () => {
		const created = await createJob(event('/api/jobs', post(intake)));
		expect(created.status).toBe(201);
		const { id } = answers.jobCreated.parse(await created.json());
		const job = answers.jobDetail.parse(await (await getJob(event(`/api/jobs/${id}`))).json());
		expect(job.customer.name).toBe('Oren Pask');
		const list = answers.jobList.parse(await (await listJobs(event('/api/jobs?q=Pask'))).json());
		expect(list.rows.map((r) => r.id)).toContain(id);
		const bad = await createJob(event('/api/jobs', post({ ...intake, imei: '123' })));
		expect(bad.status).toBe(400);
		expect(answers.apiError.parse(await bad.json()).issues?.[0].path).toBe('imei');
	});

	it('device-model suggestions parse with their schema', async () => {
		const res = await getModels(event('/api/device-models?q=a'));
		expect(answers.deviceModels.safeParse(await res.json()).success).toBe(true);
	});
});
