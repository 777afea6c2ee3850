import { beforeAll, describe, expect, it } from 'vitest';
import { getDb } from '$lib/server/db';
import { GET as verdicts } from './verdicts/+server';
import { GET as trend } from './trend/+server';
import { GET as durations } from './durations/+server';
import { GET as abandoned } from './abandoned/+server';
import { GET as accuracy } from './accuracy/+server';

// The handlers against an empty in-memory PGlite: access, parameter checking and CSV shape.
// The arithmetic is checked against hand-computed fixtures in src/lib/server/insights/insights.spec.ts.
/** Enough CSV for these checks: the exports here hold no quoted commas or line breaks. */
const parse = (text: string) =>
	text
		.trim()
		.split('\n')
		.map((line) => line.split(','));

type Handler = (event: never) => Promise<Response>;
const routes: [string, Handler][] = [
	['verdicts', verdicts as Handler],
	['trend', trend as Handler],
	['durations', durations as Handler],
	['abandoned', abandoned as Handler],
	['accuracy', accuracy as Handler]
];

const person = (role: 'technician' | 'senior' | 'lead') => ({
	id: '00000000-0000-4000-8000-000000000001',
	name: 'Fixture Person',
	email: `${role}@shop.test`,
	role
});

function call(handler: Handler, name: string, query: string, user: ReturnType<typeof person> | null) {
	return handler({
		locals: { user },
		url: new URL(`http://shop.test/api/insights/${name}?${query}`),
		route: { id: `/api/insights/${name}` },
		params: {}
	} as never);
}

async function thrown(p: Promise<unknown>) {
	return p.then(
		() => undefined,
		(e: unknown) => e as { status: number }
	);
}

// Opening and migrating the in-memory database takes seconds; do it before the timed tests.
beforeAll(async () => {
	await getDb();
});

describe.each(routes)('/api/insights/%s', (name, handler) => {
	it('is for the lead only: signed out 401, technician and senior 403', async () => {
		expect((await thrown(call(handler, name, '', null)))?.status).toBe(401);
		expect((await thrown(call(handler, name, '', person('technician'))))?.status).toBe(403);
		expect((await thrown(call(handler, name, '', person('senior'))))?.status).toBe(403);
		expect((await call(handler, name, '', person('lead'))).status).toBe(200);
	});

	it('answers 400 JSON naming the bad parameter', async () => {
		for (const query of [
			'from=2026-13-01',
			'from=2026-03-10&to=2026-03-01',
			'version=two',
			'technician=nobody',
			'format=xml'
		]) {
			const res = await call(handler, name, query, person('lead'));
			expect(res.status, query).toBe(400);
			const body = await res.json();
			expect(body.message, query).toMatch(/^(from|version|technician|format)/);
			expect(body.issues.length).toBeGreaterThan(0);
		}
	});

	it('exports CSV with a header row', async () => {
		const res = await call(handler, name, 'format=csv&from=2026-01-01&to=2026-03-31', person('lead'));
		expect(res.headers.get('content-type')).toMatch(/^text\/csv/);
		expect(res.headers.get('content-disposition')).toMatch(/attachment; filename="tidemark-.+\.csv"/);
		const rows = parse(await res.text());
		expect(rows[0].length).toBeGreaterThan(2);
	});
});

describe('tables with two parts', () => {
	it('export each part and refuse an unknown one', async () => {
		const lead = person('lead');
		const steps = await call(durations as Handler, 'durations', 'format=csv&table=steps', lead);
		expect((await steps.text()).split('\n')[0]).toBe(
			'flow,step,step_title,answers,median_minutes,p90_minutes'
		);
		const over = await call(accuracy as Handler, 'accuracy', 'format=csv&table=overturned', lead);
		expect((await over.text()).split('\n')[0]).toBe('run,job,flow,version,verdict,technician,note,at');
		const bad = await call(abandoned as Handler, 'abandoned', 'table=nope', lead);
		expect(bad.status).toBe(400);
	});

	it('trend CSV covers every week of the chosen dates', async () => {
		const res = await call(
			trend as Handler,
			'trend',
			'format=csv&from=2026-03-02&to=2026-03-22',
			person('lead')
		);
		const rows = parse(await res.text());
		expect(rows.map((r) => r[0])).toEqual(['week', '2026-03-02', '2026-03-09', '2026-03-16']);
	});
});
