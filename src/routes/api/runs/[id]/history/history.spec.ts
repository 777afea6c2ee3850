import { beforeAll, describe, expect, it } from 'vitest';
import { getDb } from '$lib/server/db';
import { GET } from './+server';

// Access and parameter checks; the figures are checked in src/lib/server/insights/insights.spec.ts.
const tech = {
	id: '00000000-0000-4000-8000-000000000009',
	name: 'T',
	email: 't@shop.test',
	role: 'technician' as const
};
const call = async (id: string, query: string, user: typeof tech | null): Promise<Response> =>
	GET({
		locals: { user },
		url: new URL(`http://shop.test/api/runs/${id}/history?${query}`),
		route: { id: '/api/runs/[id]/history' },
		params: { id }
	} as never);

beforeAll(async () => {
	await getDb();
});

describe('GET /api/runs/:id/history', () => {
	it('answers 401 signed out', async () => {
		const e = await Promise.resolve()
			.then(() => call('x', '', null))
			.then(
				() => undefined,
				(err: { status: number }) => err
			);
		expect(e?.status).toBe(401);
	});

	it('answers 400 for a step id that is not kebab-case and 404 for an unknown run', async () => {
		const bad = await call('00000000-0000-4000-8000-000000000001', 'step=Not%20A%20Step', tech);
		expect(bad.status).toBe(400);
		expect((await bad.json()).message).toMatch(/^step: /);
		const missing = await call('00000000-0000-4000-8000-000000000001', 'step=open', tech);
		expect(missing.status).toBe(404);
	});
});
