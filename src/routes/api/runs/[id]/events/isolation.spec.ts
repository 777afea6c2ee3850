import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { getDb } from '$lib/server/db';
import { runSteps } from '$lib/server/db/schema/runs';
import { imeiCheckDigit } from '$lib/domain/identifiers';
import * as staff from '$lib/server/staff/queries';
import * as jobs from '$lib/server/jobs/queries';
import * as library from '$lib/server/flows/queries';
import * as runs from '$lib/server/runs/queries';
import { restartLoopFlow } from '$lib/server/runs/walks';
import { makeJobIntake } from '$lib/schemas/job';
import { POST } from './+server';

// Each event succeeds or fails on its own merits, whatever arrives beside it: bad events sent
// together with good events of other runs never make a good one fail. The shipped restart-loop
// flow is the fixture; its first step "power-on-as-received" has three outcomes.
const tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-events-'));
let tech: { id: string; name: string; email: string; role: 'technician' };
let counter = 0;

/** POST /api/runs/:id/events as the route gets it; a thrown error is what SvelteKit answers 500. */
async function post(runId: string, body: string): Promise<number> {
	try {
		const res = await POST({
			locals: { user: tech },
			params: { id: runId },
			request: new Request(`http://shop.test/api/runs/${runId}/events`, {
				method: 'POST',
				headers: { 'content-type': 'application/json' },
				body
			}),
			route: { id: '/api/runs/[id]/events' }
		} as never);
		return res.status;
	} catch {
		return 500;
	}
}

async function newRun() {
	const body = `0066${String(++counter).padStart(10, '0')}`;
	const job = await jobs.create(
		tech.id,
		makeJobIntake().parse({
			customerName: 'Wren Alderly',
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
	return (await runs.start(job.id, restartLoopFlow, tech)).id;
}

const answer = (outcome: number | string, notes?: string) =>
	JSON.stringify({
		type: 'ANSWER',
		stepId: 'power-on-as-received',
		outcome,
		idempotencyKey: randomUUID(),
		notes
	});

async function stored(runId: string) {
	const db = await getDb();
	return db.select().from(runSteps).where(eq(runSteps.runId, runId));
}

beforeAll(async () => {
	const user = await staff.create(null, {
		name: 'Pell Oakhart',
		email: 'pell@shop.test',
		role: 'technician',
		password: 'tech-password-1'
	});
	tech = { id: user.id, name: 'Pell Oakhart', email: 'pell@shop.test', role: 'technician' };
	fs.copyFileSync(
		path.resolve('flows', `${restartLoopFlow}.flow.yaml`),
		path.join(tmp, `${restartLoopFlow}.flow.yaml`)
	);
	await library.importFromFiles(tmp);
});

afterAll(() => fs.rmSync(tmp, { recursive: true, force: true }));

describe('POST /api/runs/:id/events: one event, one verdict', () => {
	it('good events of other runs all land beside a bad body, an unknown run, a NUL in a note, a refused answer and a stale step', async () => {
		for (let round = 0; round < 4; round++) {
			const good = await Promise.all([newRun(), newRun(), newRun(), newRun()]);
			const [forNul, forRefused, forStale] = await Promise.all([newRun(), newRun(), newRun()]);
			const bad = [
				post(forRefused, '{"type":"ANSWER"'), // not JSON
				post(forRefused, JSON.stringify({ type: 'ANSWER', stepId: 'power-on-as-received' })), // no key
				post(randomUUID(), answer(0)), // no such run
				post(forNul, answer(0, 'residue under the \u0000 shield')),
				post(forRefused, answer(7)), // not an outcome of the step
				post(
					forStale,
					JSON.stringify({
						type: 'ANSWER',
						stepId: 'clean-and-dry',
						outcome: 1,
						idempotencyKey: randomUUID()
					})
				)
			];
			// Interleaved, so that good and bad arrive in the same turn of the event loop.
			const sent = await Promise.all([
				post(good[0], answer(0)),
				bad[0],
				post(good[1], answer(1)),
				bad[1],
				bad[2],
				post(good[2], answer(2, 'Corrosion near the connector')),
				bad[3],
				bad[4],
				post(good[3], answer('Restarts again and again')),
				bad[5]
			]);
			const [g0, b0, g1, b1, b2, g2, b3, b4, g3, b5] = sent;
			expect([g0, g1, g2, g3]).toEqual([200, 200, 200, 200]);
			expect([b0, b1, b2, b4, b5]).toEqual([400, 400, 404, 400, 409]);
			// The database refuses a NUL in text; whatever the answer, it is not a success.
			expect(b3).toBeGreaterThanOrEqual(400);
			for (const runId of good) expect(await stored(runId)).toHaveLength(1);
			for (const runId of [forNul, forRefused, forStale]) expect(await stored(runId)).toHaveLength(0);
			expect((await runs.get(forNul))!.currentStep).toBe('power-on-as-received');
		}
	});
});
