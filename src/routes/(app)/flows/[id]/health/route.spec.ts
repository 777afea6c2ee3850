import { beforeAll, describe, expect, it, vi } from 'vitest';
import { person, type TestPerson } from '$lib/server/staff/fixtures';
import * as library from '$lib/server/flows/queries';
import { load as pageLoad } from './+page.server';
import { GET } from '../../../../api/flows/[id]/health/+server';

// Real in-memory PGlite with the shipped flows imported as at start-up; no runs yet. The figures
// themselves are checked in src/lib/server/flow-health/flow-health.spec.ts.
const FLOW = 'no-sound-after-liquid';
let senior: TestPerson, lead: TestPerson, tech: TestPerson;

function event(user: TestPerson | null, query = '', api = false, id = FLOW) {
	const path = api ? `/api/flows/${id}/health` : `/flows/${id}/health`;
	const url = new URL(`http://shop.test${path}${query}`);
	const route = { id: api ? '/api/flows/[id]/health' : '/(app)/flows/[id]/health' };
	// eslint-disable-next-line @typescript-eslint/no-explicit-any
	return { url, params: { id }, locals: { user }, route, request: new Request(url) } as any;
}
type Data = Exclude<Awaited<ReturnType<typeof pageLoad>>, void>;
const load = async (e: Parameters<typeof pageLoad>[0]) => (await pageLoad(e)) as Data;

beforeAll(async () => {
	vi.spyOn(console, 'log').mockImplementation(() => {});
	await library.importFromFiles('flows');
	senior = await person('Sorrel', 'senior', 'health.test');
	lead = await person('Linnet', 'lead', 'health.test');
	tech = await person('Tamsin', 'technician', 'health.test');
});

describe('flow health page and API', () => {
	it('refuses technicians with 403 and the signed-out with a sign-in redirect or 401', async () => {
		await expect(load(event(tech))).rejects.toMatchObject({ status: 403 });
		await expect(GET(event(tech, '?version=1', true))).rejects.toMatchObject({ status: 403 });
		await expect(load(event(null))).rejects.toMatchObject({ status: 303 });
		await expect(GET(event(null, '?version=1', true))).rejects.toMatchObject({ status: 401 });
	});

	it('opens for seniors and leads at the current version, listing every version with its runs', async () => {
		for (const user of [senior, lead]) {
			const data = await load(event(user));
			expect(data).toMatchObject({
				flow: { id: FLOW },
				current: 1,
				version: 1,
				versions: [{ version: 1, status: 'published', runs: 0 }]
			});
			expect(data.thresholds.minRuns).toBe(10);
		}
	});

	it('answers the version as JSON: every step, no runs yet, nothing flagged', async () => {
		const res = await GET(event(senior, '?version=1', true));
		expect(res.status).toBe(200);
		const { health } = await res.json();
		const current = (await library.currentPublished(FLOW))!;
		expect(health).toMatchObject({ flowId: FLOW, version: 1, runs: 0, flagged: 0 });
		expect(health.steps.map((s: { stepId: string }) => s.stepId)).toEqual(
			Object.keys(current.definition.steps)
		);
	});

	it('refuses a bad version with 400 and an unknown one with 404, with a reason', async () => {
		const bad = await GET(event(senior, '?version=two', true));
		expect(bad.status).toBe(400);
		expect((await bad.json()).message).toMatch(/^version: /);
		const missing = await GET(event(senior, '?version=9', true));
		expect(missing.status).toBe(404);
		expect((await missing.json()).message).toContain('no published version 9');
		expect((await GET(event(senior, '?version=1', true, 'no-such-flow'))).status).toBe(404);
		await expect(load(event(senior, '?version=x'))).rejects.toMatchObject({ status: 400 });
		await expect(load(event(senior, '?version=9'))).rejects.toMatchObject({ status: 404 });
		await expect(load(event(senior, '', false, 'Not_A_Flow'))).rejects.toMatchObject({ status: 404 });
	});
});
