import { beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { getDb } from '$lib/server/db';
import { runSteps } from '$lib/server/db/schema';
import { buildWorld, type World } from '$lib/server/testing/world';
import { makeEvent } from '$lib/server/testing/events';
import { POST } from './+server';

let w: World;
beforeAll(async () => {
	w = await buildWorld();
});

function post(body: unknown, runId = w.runId) {
	return POST(
		makeEvent(`/api/runs/${runId}/events`, {
			method: 'POST',
			body: JSON.stringify(body),
			headers: { 'content-type': 'application/json' },
			params: { id: runId },
			routeId: '/api/runs/[id]/events',
			locals: { user: w.tech }
		}) as never
	);
}

async function steps() {
	const db = await getDb();
	return db
		.select({ seq: runSteps.seq, answer: runSteps.answer, key: runSteps.idempotencyKey })
		.from(runSteps)
		.where(eq(runSteps.runId, w.runId))
		.orderBy(runSteps.seq);
}

describe('POST /api/runs/:id/events with a repeated idempotency key', () => {
	const first = {
		type: 'ANSWER',
		stepId: 'power-on-as-received',
		outcome: 0,
		idempotencyKey: 'key-0000-0001'
	};

	it('replays the first answer for the same body (200), and refuses a different body with 422', async () => {
		const a = await post(first);
		expect(a.status).toBe(200);
		const answer = await a.json();
		// Same body, fields in another order: the same request.
		const again = await post({
			idempotencyKey: first.idempotencyKey,
			outcome: 0,
			stepId: first.stepId,
			type: 'ANSWER'
		});
		expect(again.status).toBe(200);
		expect(await again.json()).toEqual(answer);
		const before = await steps();
		const other = await post({ ...first, outcome: 1 });
		expect(other.status).toBe(422);
		expect(await other.json()).toMatchObject({
			code: 'key-reused',
			message: expect.stringMatching(/already used for a different request/)
		});
		const notes = await post({ ...first, notes: 'a note the first request did not have' });
		expect(notes.status).toBe(422);
		expect(await steps()).toEqual(before);
	});

	it('a refused request does not hold its key: the corrected request with that key is applied', async () => {
		const key = 'key-0000-0002';
		const refused = await post({
			type: 'ANSWER',
			stepId: 'power-on-as-received',
			outcome: 0,
			idempotencyKey: key
		});
		expect(refused.status).toBe(409); // that step is behind the run now
		expect((await steps()).map((s) => s.key)).toEqual(['key-0000-0001']); // only the first test's key
		const applied = await post({
			type: 'ANSWER',
			stepId: 'open-and-disconnect',
			outcome: 1,
			idempotencyKey: key
		});
		expect(applied.status).toBe(200);
		expect((await steps()).map((s) => s.key)).toEqual(['key-0000-0001', key]);
	});
});
