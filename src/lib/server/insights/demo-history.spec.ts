import { beforeAll, describe, expect, it } from 'vitest';
import { and, eq, isNull, ne, sql } from 'drizzle-orm';
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
const SAMPLE = 400;

beforeAll(async () => {
	await seedDemo();
	await library.importFromFiles();
	const r = await generateHistory({ runs: SAMPLE, seed: 7, end, extraTechnicians: false, batch: 150 });
	expect(r.runs).toBe(SAMPLE);
});

describe('demo history', () => {
	it('writes finished runs with their facts inside the year before `end`', async () => {
		const db = await getDb();
		const facts = await db.select().from(insightRunFacts);
		expect(facts).toHaveLength(SAMPLE);
		const statuses = new Set(facts.map((f) => f.status));
		expect(statuses).toEqual(new Set(['completed', 'abandoned']));
		for (const f of facts) {
			expect(f.finishedAt.getTime()).toBeLessThanOrEqual(end.getTime() + 86_400_000);
			expect(f.startedAt.getTime()).toBeGreaterThan(end.getTime() - 372 * 86_400_000);
			expect(f.durationS).toBeGreaterThan(0);
		}
	});

	it('covers every shipped flow, so Insights and flow health show runs for each', async () => {
		const db = await getDb();
		const shipped = await db
			.selectDistinct({ flowId: flowVersions.flowId })
			.from(flowVersions)
			.where(eq(flowVersions.status, 'published'));
		const done = await db
			.select({ flowId: flowVersions.flowId, n: sql<number>`count(*)::int` })
			.from(runs)
			.innerJoin(flowVersions, eq(flowVersions.id, runs.flowVersionId))
			.where(eq(runs.status, 'completed'))
			.groupBy(flowVersions.flowId);
		const counts = new Map(done.map((d) => [d.flowId, d.n]));
		expect(shipped.length).toBeGreaterThanOrEqual(18);
		for (const { flowId } of shipped) expect(counts.get(flowId) ?? 0, flowId).toBeGreaterThan(0);
	});

	it('every path replays through the pinned flow version and ends where the run stands', async () => {
		const db = await getDb();
		const all = await db.select().from(runs).innerJoin(flowVersions, eq(flowVersions.id, runs.flowVersionId));
		for (const { runs: run, flow_versions: version } of all) {
			const steps = await db.select().from(runSteps).where(eq(runSteps.runId, run.id)).orderBy(runSteps.seq);
			const events: FlowEvent[] = steps.map((s) => {
				const a = s.answer as StepAnswer;
				if ('back' in a) return { type: 'BACK' };
				return 'outcome' in a
					? { type: 'ANSWER', outcome: a.outcome.index }
					: { type: 'MEASURE', value: a.value };
			});
			const { snapshot, refusedAt } = replay(compileFlow(library.withStepOrder(version).definition), events);
			expect(refusedAt).toBeNull();
			expect(String(snapshot.value)).toBe(run.currentStep);
			if (run.status === 'completed') {
				expect(snapshot.status).toBe('done');
				expect(String(snapshot.value)).toBe(run.verdictStep);
			} else {
				expect(snapshot.status).toBe('active');
				expect(run.abandonReason).toBeTruthy();
			}
		}
	});

	it('a BACK supersedes the newest standing answer at its own time, as the run screen does', async () => {
		const db = await getDb();
		const rows = await db.select().from(runSteps).orderBy(runSteps.runId, runSteps.seq);
		const byRun = new Map<string, typeof rows>();
		for (const r of rows) byRun.set(r.runId, [...(byRun.get(r.runId) ?? []), r]);
		let backs = 0;
		for (const steps of byRun.values()) {
			const standing: typeof steps = [];
			for (const [k, s] of steps.entries()) {
				expect(s.seq).toBe(k + 1);
				if (k > 0) expect(s.enteredAt).toEqual(steps[k - 1].answeredAt);
				const a = s.answer as StepAnswer;
				if (s.kind === 'back') {
					backs++;
					const revised = standing.pop()!;
					expect(a).toEqual({ back: { revised: revised.seq } });
					expect(revised.supersededAt).toEqual(s.answeredAt);
					expect(s.supersededAt).toBeNull();
				} else standing.push(s);
			}
			for (const s of standing) expect(s.supersededAt).toBeNull();
		}
		expect(backs).toBeGreaterThan(0);
	});

	it('the facts keep only the answers that still count', async () => {
		const db = await getDb();
		const facts = await db.select().from(insightRunFacts);
		const standing = await db
			.select({ runId: runSteps.runId, n: sql<number>`count(*)::int` })
			.from(runSteps)
			.where(and(ne(runSteps.kind, 'back'), isNull(runSteps.supersededAt)))
			.groupBy(runSteps.runId);
		const count = new Map(standing.map((r) => [r.runId, r.n]));
		for (const f of facts) expect(f.stepIds).toHaveLength(count.get(f.runId) ?? 0);
	});

	it('averages about 8 stored events per run (issue #6: 100,000 runs / 800,000 steps), within 10 %', async () => {
		const db = await getDb();
		const [{ steps }] = await db.select({ steps: sql<number>`count(*)::int` }).from(runSteps);
		const perRun = steps / SAMPLE;
		expect(perRun).toBeGreaterThanOrEqual(7.2);
		expect(perRun).toBeLessThanOrEqual(8.8);
	});
});
