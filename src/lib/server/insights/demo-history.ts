// Over 300 lines on purpose: flow data, a year of invented demo history walked through the flows.
/**
 * Invented history for the demo shop, so the insights have something to show: a year of runs over
 * the published flows, walked through each flow's compiled machine with random answers (so every
 * path is one the flow allows) and stored event by event as the run screen stores them: BACKs that
 * revise an answer or re-take a reading, "dry longer" repeats, about 8 rows per run. With
 * seasonality (more phones in wet weeks), durations from the steps' minutes, some abandoned runs
 * and some overturned verdicts. Every person, customer and device here is made up. Not for a real
 * shop's database.
 */
import { inArray, sql } from 'drizzle-orm';
import { getDb, type DB } from '$lib/server/db';
import { customers, jobs } from '$lib/server/db/schema/jobs';
import { flowVersions } from '$lib/server/db/schema/flows';
import { runs, runSteps, type StepAnswer } from '$lib/server/db/schema/runs';
import { insightRunFacts, verdictConfirmations } from '$lib/server/db/schema/insights';
import { users } from '$lib/server/db/schema/users';
import { withStepOrder } from '$lib/server/flows/queries';
import * as staff from '$lib/server/staff/queries';
import { demoPassword } from '$lib/server/demo/seed';
import { seedModels } from '$lib/server/jobs/device-models';
import { assessExposure } from '$lib/domain/exposure';
import { imeiCheckDigit } from '$lib/domain/identifiers';
import { applyEvent, compileFlow, type FlowMachine, type FlowSnapshot } from '$lib/flows/machine';
import type { FlowDefinition, MeasureStep } from '$lib/flows/schema';
import { initialTransition } from 'xstate';
import { recordRunsFinished } from './facts';

/** Invented bench staff added next to the demo's three accounts. */
export const historyTechnicians = [
	{ name: 'Kasimir Lund', email: 'kasimir@tidemark.test' },
	{ name: 'Priya Ostrander', email: 'priya@tidemark.test' },
	{ name: 'Elodie Marchetti', email: 'elodie@tidemark.test' },
	{ name: 'Bartholomew Quennock', email: 'bart@tidemark.test' },
	{ name: 'Saoirse Kettle', email: 'saoirse@tidemark.test' }
];

const firstNames = [
	'Ada',
	'Bruno',
	'Cleo',
	'Dmitri',
	'Esme',
	'Felix',
	'Greta',
	'Hugo',
	'Ines',
	'Jasper',
	'Kira',
	'Lenny',
	'Mina',
	'Noor',
	'Otto',
	'Pia'
];
const lastNames = [
	'Ashgrove',
	'Brindle',
	'Copperdell',
	'Dunmore',
	'Ellwood',
	'Fairweather',
	'Gullane',
	'Hartsmere',
	'Ivesdale',
	'Juniper',
	'Kestrel',
	'Larkspur'
];
const abandonReasons = [
	'Customer collected the phone before the diagnosis finished',
	'Customer declined further diagnosis',
	'Waiting for a donor board; run stopped',
	'Phone found to be a different model than booked in',
	'Started the wrong flow'
];
const overturnNotes = [
	'Repair did not fix it; the fault was elsewhere on the board',
	'Part replaced, same symptom: verdict did not hold',
	'Cleaning alone fixed it; no part was needed',
	'Second corrosion site found under a shield',
	'Customer returned within a week with the same fault'
];

/** A small seeded generator (mulberry32) so that a given seed gives the same history. */
function random(seed: number) {
	let a = seed >>> 0;
	return () => {
		a = (a + 0x6d2b79f5) >>> 0;
		let t = a;
		t = Math.imul(t ^ (t >>> 15), t | 1);
		t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
		return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
	};
}

type Rng = () => number;
const pick = <T>(rng: Rng, xs: readonly T[]) => xs[Math.floor(rng() * xs.length)];
function weighted<T>(rng: Rng, xs: readonly T[], weight: (x: T, i: number) => number): T {
	const ws = xs.map(weight);
	let r = rng() * ws.reduce((a, b) => a + b, 0);
	for (let i = 0; i < xs.length; i++) if ((r -= ws[i]) <= 0) return xs[i];
	return xs[xs.length - 1];
}
/** Log-normal factor around 1 (σ on the log scale): task times are skewed, never negative. */
function spread(rng: Rng, sigma: number) {
	const u = Math.max(rng(), 1e-12);
	const z = Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * rng());
	return Math.exp(sigma * z);
}

const DAY = 86_400_000;
const WEEK = 7 * DAY;

/**
 * Invented weekly "wetness": wetter in autumn and winter, plus a handful of storm weeks that bring
 * in about twice the phones. Liquid jobs follow it.
 */
function weekWeights(weeks: number, rng: Rng, end: number) {
	const storms = new Set(Array.from({ length: 6 }, () => Math.floor(rng() * weeks)));
	return Array.from({ length: weeks }, (_, i) => {
		const t = end - (weeks - i) * WEEK;
		const dayOfYear = (t / DAY) % 365.25;
		// Peak around day 330 (late November), trough in early summer.
		const season = 1 + 0.45 * Math.cos((2 * Math.PI * (dayOfYear - 330)) / 365.25);
		return season * (storms.has(i) ? 2.2 : 1) * (0.85 + 0.3 * rng());
	});
}

/** One stored event of a walk: an answer, a reading or a BACK (which revises an earlier row). */
type WalkRow = {
	stepId: string;
	kind: string;
	answer: StepAnswer;
	seconds: number;
	/** For a BACK: the index of the row it revises (that row is superseded when the BACK is written). */
	revises?: number;
	/** The step the run stands at after this event. */
	after: string;
	snapshot: FlowSnapshot;
};

type Walk = { snapshot: FlowSnapshot; done: boolean; rows: WalkRow[] };

/** A value inside a measure step's range `index` (ranges are [min, max)). */
function readingIn(step: MeasureStep, index: number, rng: Rng) {
	const r = step.ranges![index];
	const lo = r.min ?? step.domain?.min ?? 0;
	const hi = r.max ?? Math.max(lo * 3, lo + 1);
	const v = lo + (hi - lo) * (0.05 + 0.9 * rng());
	return Number(v.toPrecision(3));
}

/**
 * How often a technician goes BACK to revise the answer before (invented rates): a reading is
 * re-taken more often than a test is redone (probe slipped, meter on the wrong range). At most
 * `MAX_REVISIONS` per run, never two BACKs in a row.
 */
const REVISION_RATE = { measure: 0.5, choice: 0.25 } as const;
const MAX_REVISIONS = 4;
/** Share of revisions that end with the same answer (the re-check agrees with the first look). */
const SAME_AGAIN = 0.5;

/**
 * One random walk through the machine, event by event, as a technician would send them: answers,
 * readings and BACKs, so the stored rows are what the run screen would have written. Answers that
 * lead back to an earlier step ("dry longer", re-measure after drying) come up less often each
 * time round, and early verdicts are rarer than late ones (most phones need a few tests).
 */
function walk(def: FlowDefinition, machine: FlowMachine, rng: Rng, speed: number, bias: number[]): Walk {
	let [snapshot] = initialTransition(machine);
	const rows: WalkRow[] = [];
	/** Indices of the answers still standing (a BACK pops the newest). */
	const standing: number[] = [];
	const visits = new Map<string, number>();
	let revisions = 0;
	/** The row a BACK just revised: the step is being answered again. */
	let revisiting: WalkRow | null = null;
	const weightOf = (id: string, next: string, i: number) => {
		const been = visits.get(next) ?? 0;
		if (been > 0) return (next === id ? 1.3 : 0.6) / been;
		return (def.steps[next]?.kind === 'verdict' && standing.length < 5 ? 0.1 : 1) * (1 + (bias[i] ?? 0));
	};
	const minutes = (m: number | undefined) => Math.max(0.5, m ?? 1) * 60 * speed;
	for (let guard = 0; guard < 80 && snapshot.status === 'active'; guard++) {
		const id = String(snapshot.value);
		const step = def.steps[id];
		const last = standing.length ? rows[standing[standing.length - 1]] : null;
		if (
			last &&
			!revisiting &&
			revisions < MAX_REVISIONS &&
			rng() < (last.kind === 'measure' ? REVISION_RATE.measure : REVISION_RATE.choice)
		) {
			const back = applyEvent(machine, snapshot, { type: 'BACK' });
			if (back.accepted) {
				const revises = standing.pop()!;
				snapshot = back.snapshot;
				// A short look at this step before going back (seconds, not the step's minutes).
				rows.push({
					stepId: id,
					kind: 'back',
					answer: { back: { revised: revises + 1 } },
					seconds: Math.round(15 + rng() * 75),
					revises,
					after: String(snapshot.value),
					snapshot
				});
				revisions++;
				revisiting = rows[revises];
				continue;
			}
		}
		visits.set(id, (visits.get(id) ?? 0) + (revisiting ? 0 : 1));
		// A second look at a step is quicker than the first.
		const seconds = Math.round(minutes(step.minutes) * (revisiting ? 0.45 : 1) * spread(rng, 0.45));
		const again = revisiting && rng() < SAME_AGAIN ? revisiting.answer : null;
		let event;
		let answer: StepAnswer;
		if (step.kind === 'measure') {
			const ranges = step.ranges ?? [];
			const r =
				again && 'range' in again
					? again.range.index
					: ranges.indexOf(weighted(rng, ranges, (x, i) => weightOf(id, x.next, i)));
			const value = readingIn(step, r, rng);
			event = { type: 'MEASURE' as const, value };
			answer = { value, unit: step.unit, range: { index: r, label: ranges[r].label ?? null } };
		} else if (step.kind === 'symptom' || step.kind === 'test') {
			const outcomes = step.outcomes ?? [];
			const o =
				again && 'outcome' in again
					? again.outcome.index
					: outcomes.indexOf(weighted(rng, outcomes, (x, i) => weightOf(id, x.next, i)));
			event = { type: 'ANSWER' as const, outcome: o };
			answer = { outcome: { index: o, label: outcomes[o].label } };
		} else break;
		const next = applyEvent(machine, snapshot, event);
		if (!next.accepted) break;
		snapshot = next.snapshot;
		standing.push(rows.length);
		rows.push({ stepId: id, kind: step.kind, answer, seconds, after: String(snapshot.value), snapshot });
		revisiting = null;
	}
	return { snapshot, done: snapshot.status === 'done', rows };
}

export type HistoryOptions = {
	runs: number;
	/** Same seed, same history. */
	seed?: number;
	/** History ends at this instant (default now) and spans `days` before it. */
	end?: Date;
	days?: number;
	batch?: number;
	/** Add the invented bench staff (default); false uses the staff already there. */
	extraTechnicians?: boolean;
	onProgress?: (done: number, total: number) => void;
	/** Milliseconds to wait between batches (0: just yield). */
	pauseMs?: number;
};

/**
 * Adds `runs` invented finished runs (with their jobs, customers, steps, confirmations and facts)
 * to the database. Needs the published flows and the demo staff; adds a few invented technicians.
 */
export async function generateHistory(opts: HistoryOptions): Promise<{ runs: number; steps: number }> {
	const db = await getDb();
	const rng = random(opts.seed ?? 20260601);
	const end = (opts.end ?? new Date()).getTime();
	const days = opts.days ?? 365;
	const batch = opts.batch ?? 500;

	const published = await db
		.select()
		.from(flowVersions)
		.where(sql`${flowVersions.status} in ('published', 'retired')`);
	if (published.length === 0)
		throw new Error('No published flows: start the app once so the flows are imported.');
	const versions = published.map((row) => {
		const v = withStepOrder(row);
		return {
			id: v.id,
			flowId: v.flowId,
			version: v.version ?? 1,
			publishedAt: v.publishedAt,
			def: v.definition,
			machine: compileFlow(v.definition)
		};
	});
	const flowIds = [...new Set(versions.map((v) => v.flowId))];
	// Some complaints come in more often than others (invented weights).
	const common: Record<string, number> = {
		'no-power-after-liquid': 3,
		'restart-loop-after-liquid': 2,
		'not-charging-after-liquid': 2,
		'no-sound-after-liquid': 1.5
	};
	const flowWeight = new Map(flowIds.map((id) => [id, common[id] ?? 1]));
	// Per flow, a fixed lean towards some answers, so verdict shares differ between flows.
	const bias = new Map(flowIds.map((id) => [id, Array.from({ length: 6 }, () => rng() * 2)]));

	const technicians = await ensureTechnicians(db, opts.extraTechnicians ?? true);
	const [lead] = await db
		.select({ id: users.id })
		.from(users)
		.where(sql`${users.role} = 'lead'`)
		.limit(1);
	const speeds = new Map(technicians.map((t) => [t, 0.75 + rng() * 0.6]));
	const weights = weekWeights(Math.ceil(days / 7), rng, end);
	const start = end - weights.length * WEEK;

	let stepsWritten = 0;
	for (let done = 0; done < opts.runs;) {
		const n = Math.min(batch, opts.runs - done);
		const plan = Array.from({ length: n }, () => {
			const week = weights.indexOf(weighted(rng, weights, (w) => w));
			const startedAt = Math.min(
				end - 3_600_000,
				start + week * WEEK + Math.floor(rng() * 6) * DAY + (8.5 + rng() * 9) * 3_600_000
			);
			const flowId = weighted(rng, flowIds, (id) => flowWeight.get(id)!);
			// The version a run pins is the newest one published before it started (else the first).
			const candidates = versions.filter((v) => v.flowId === flowId).sort((a, b) => a.version - b.version);
			const version =
				[...candidates].reverse().find((v) => (v.publishedAt?.getTime() ?? 0) <= startedAt) ?? candidates[0];
			const tech = pick(rng, technicians);
			const model = weighted(rng, seedModels, (_, i) => [4, 3, 3, 2, 1, 1.5][i] ?? 1);
			const w = walk(version.def, version.machine, rng, speeds.get(tech)!, bias.get(flowId)!);
			const abandon = !w.done || rng() < 0.05;
			// An abandoned run stops somewhere along its path.
			const kept = abandon ? w.rows.slice(0, Math.floor(rng() * w.rows.length)) : w.rows;
			return { startedAt, version, tech, model, walk: w, abandon, kept };
		});

		await db.transaction(async (tx) => {
			const people = await tx
				.insert(customers)
				.values(
					plan.map(() => ({
						name: `${pick(rng, firstNames)} ${pick(rng, lastNames)}`,
						phone: `+00 555 0${100 + Math.floor(rng() * 900)}`
					}))
				)
				.returning({ id: customers.id });
			const jobRows = await tx
				.insert(jobs)
				.values(
					plan.map((p, i) => {
						const body = `00${String(Math.floor(rng() * 1e12)).padStart(12, '0')}`;
						const liquid = weighted(
							rng,
							['fresh', 'salt', 'chlorinated', 'sugary', 'other'] as const,
							(_, k) => [5, 2, 1, 3, 1][k]
						);
						const submerged = rng() < 0.55;
						const exposure = submerged
							? { liquid, submerged, depthM: 0.5, minutes: 5 }
							: { liquid, submerged };
						const intake = new Date(p.startedAt - (1 + rng() * 30) * 3_600_000);
						return {
							customerId: people[i].id,
							maker: p.model.maker,
							model: p.model.model,
							imei: `${body}${imeiCheckDigit(body)}`,
							symptoms: p.version.def.symptoms,
							liquid,
							submerged,
							depthM: submerged ? 0.5 : null,
							minutes: submerged ? 5 : null,
							rating: { code: null },
							exposureAssessment: assessExposure({ code: null }, exposure),
							passcodeStatus: 'given' as const,
							consentToOpen: true,
							consentAt: intake,
							status: 'collected' as const,
							technicianId: p.tech,
							createdAt: intake,
							promisedAt: new Date(intake.getTime() + 3 * DAY),
							updatedAt: new Date(p.startedAt + 3 * DAY)
						};
					})
				)
				.returning({ id: jobs.id });

			const runRows = await tx
				.insert(runs)
				.values(
					plan.map((p, i) => {
						const seconds = p.kept.reduce((s, x) => s + x.seconds, 0) + Math.round(60 + rng() * 240);
						const finishedAt = new Date(p.startedAt + seconds * 1000);
						const verdictStep = p.abandon ? null : String(p.walk.snapshot.value);
						const verdictDef = verdictStep ? p.version.def.steps[verdictStep] : undefined;
						return {
							jobId: jobRows[i].id,
							flowVersionId: p.version.id,
							technicianId: p.tech,
							status: p.abandon ? ('abandoned' as const) : ('completed' as const),
							lastSeq: p.kept.length,
							// An abandoned run keeps the state it stood in when it was stopped.
							snapshot: p.version.machine.getPersistedSnapshot(
								p.abandon
									? (p.kept.at(-1)?.snapshot ?? initialTransition(p.version.machine)[0])
									: p.walk.snapshot
							) as Record<string, unknown>,
							currentStep: p.abandon ? (p.kept.at(-1)?.after ?? p.version.def.start) : verdictStep!,
							verdictCode: verdictDef?.kind === 'verdict' ? verdictDef.verdict.code : null,
							verdictStep,
							abandonReason: p.abandon ? pick(rng, abandonReasons) : null,
							startedAt: new Date(p.startedAt),
							finishedAt,
							updatedAt: finishedAt
						};
					})
				)
				.returning({
					id: runs.id,
					status: runs.status,
					verdictCode: runs.verdictCode,
					finishedAt: runs.finishedAt
				});

			// As the run screen writes them: each row entered when the one before was answered, and a
			// BACK supersedes the answer it revises at the moment it is written.
			const stepRows = plan.flatMap((p, i) => {
				const answered: number[] = [];
				let t = p.startedAt;
				for (const s of p.kept) answered.push((t += s.seconds * 1000));
				const supersededAt = new Map<number, Date>();
				p.kept.forEach((s, k) => {
					if (s.revises !== undefined) supersededAt.set(s.revises, new Date(answered[k]));
				});
				return p.kept.map((s, k) => ({
					runId: runRows[i].id,
					seq: k + 1,
					stepId: s.stepId,
					kind: s.kind,
					answer: s.answer,
					actorId: p.tech,
					enteredAt: new Date(k === 0 ? p.startedAt : answered[k - 1]),
					answeredAt: new Date(answered[k]),
					supersededAt: supersededAt.get(k) ?? null,
					idempotencyKey: `demo-history-${k + 1}`,
					result: { seq: k + 1, demo: true }
				}));
			});
			for (let k = 0; k < stepRows.length; k += 2000)
				await tx.insert(runSteps).values(stepRows.slice(k, k + 2000));
			stepsWritten += stepRows.length;

			// The repair's word: most verdicts older than a fortnight have been judged; a few did not hold.
			const judged = runRows.filter(
				(r) => r.status === 'completed' && r.finishedAt!.getTime() < end - 14 * DAY && rng() < 0.75
			);
			if (judged.length)
				await tx.insert(verdictConfirmations).values(
					judged.map((r) => {
						const risky = (r.verdictCode ?? '').length % 3 === 0; // some verdicts hold less often
						const confirmed = rng() > (risky ? 0.22 : 0.07);
						return {
							runId: r.id,
							confirmed,
							note: confirmed ? '' : pick(rng, overturnNotes),
							by: lead?.id ?? null,
							at: new Date(r.finishedAt!.getTime() + (2 + rng() * 5) * DAY)
						};
					})
				);
			await recordRunsFinished(
				tx,
				runRows.map((r) => r.id)
			);
		});
		done += n;
		opts.onProgress?.(done, opts.runs);
		// A pause lets a live server answer the requests that queued behind the batch.
		await new Promise((r) => (opts.pauseMs ? setTimeout(r, opts.pauseMs) : setImmediate(r)));
	}
	return { runs: opts.runs, steps: stepsWritten };
}

/** The demo's technicians plus the invented bench staff (created once, demo password). */
async function ensureTechnicians(db: DB, extra: boolean): Promise<string[]> {
	const existing = await db.select({ email: users.email }).from(users);
	const have = new Set(existing.map((u) => u.email.toLowerCase()));
	for (const t of extra ? historyTechnicians : [])
		if (!have.has(t.email))
			await staff.create(null, {
				...t,
				role: 'technician',
				password: demoPassword(),
				mustChangePassword: false
			});
	const rows = await db
		.select({ id: users.id })
		.from(users)
		.where(inArray(users.role, ['technician', 'senior']));
	return rows.map((r) => r.id);
}

/** How many finished runs the insights know of: the start-up hint and the e2e task look at it. */
export async function historySize(): Promise<number> {
	const db = await getDb();
	const [{ n }] = await db.select({ n: sql<number>`count(*)::int` }).from(insightRunFacts);
	return n;
}
