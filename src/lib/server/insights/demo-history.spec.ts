import { beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { getDb } from '$lib/server/db';
import { runs, runSteps } from '$lib/server/db/schema/runs';
import { flowVersions } from '$lib/server/db/schema/flows';
import { insightRunFacts } from '$lib/server/db/schema/insights';
import { seedDemo } from '$lib/server/demo/seed';
import * as library from '$lib/server/flows/queries';
import { compileFlow, replay, type FlowEvent } from '$lib/flows/machine';
import type { StepAnswer } from '$lib/server/db/schema/runs';
import { generateHistory } from './demo-history';

// The invented history must be history the flows allow: every stored path replays through the
// compiled machine of the version the run pinned, and ends where the run says it ended.
const end = new Date('2026-06-30T12:00:00Z');

beforeAll(async () => {
	await seedDemo();
	await library.importFromFiles();
	const r = await generateHistory({ runs: 80, seed: 7, end, extraTechnicians: false, batch: 30 });
	expect(r.runs).toBe(80);
});

describe('demo history', () => {
	it('writes finished runs with their facts inside the year before `end`', async () => {
		const db = await getDb();
		const facts = await db.select().from(insightRunFacts);
		expect(facts).toHaveLength(80);
		const statuses = new Set(facts.map((f) => f.status));
		expect(statuses).toEqual(new Set(['completed', 'abandoned']));
		for (const f of facts) {
			expect(f.finishedAt.getTime()).toBeLessThanOrEqual(end.getTime() + 86_400_000);
			expect(f.startedAt.getTime()).toBeGreaterThan(end.getTime() - 372 * 86_400_000);
			expect(f.durationS).toBeGreaterThan(0);
		}
	});

	it('every path replays through the pinned flow version and ends at the stored verdict', async () => {
		const db = await getDb();
		const all = await db.select().from(runs).innerJoin(flowVersions, eq(flowVersions.id, runs.flowVersionId));
		for (const { runs: run, flow_versions: version } of all) {
			const steps = await db.select().from(runSteps).where(eq(runSteps.runId, run.id)).orderBy(runSteps.seq);
			const events: FlowEvent[] = steps.map((s) => {
				const a = s.answer as StepAnswer;
				return 'outcome' in a
					? { type: 'ANSWER', outcome: a.outcome.index }
					: { type: 'MEASURE', value: (a as { value: number }).value };
			});
			const { snapshot, refusedAt } = replay(compileFlow(library.withStepOrder(version).definition), events);
			expect(refusedAt).toBeNull();
			if (run.status === 'completed') {
				expect(snapshot.status).toBe('done');
				expect(String(snapshot.value)).toBe(run.verdictStep);
			} else expect(run.abandonReason).toBeTruthy();
		}
	});
});
