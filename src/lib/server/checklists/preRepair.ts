/**
 * The pre-repair function test: what worked when the phone came in. Recorded at intake (or later
 * from the job page) and editable until the repair starts, so a fault that was there before the
 * repair is on record and the customer report shows it beside the after-repair result.
 */
import { RuleError } from '$lib/server/errors';
import { eq } from 'drizzle-orm';
import { z } from 'zod';
import { text } from '$lib/schemas/text';
import { getDb } from '$lib/server/db';
import { jobs as jobsTable } from '$lib/server/db/schema/jobs';
import { record } from '$lib/server/audit';
import * as jobs from '$lib/server/jobs/queries';
import { capabilitiesOf } from '$lib/server/jobs/device-models';
import {
	COULD_NOT_POWER_ON,
	functionResults,
	functionTestsFor,
	type FunctionTestDef,
	type PreRepairTest
} from '$lib/domain/functionTests';
import type { JobStatus } from '$lib/domain/jobStatus';

/** Before the repair starts the answers can still change; after, they are the record. */
export const preRepairEditable: readonly JobStatus[] = ['received', 'diagnosing', 'awaiting-approval'];

const answer = z.object({
	result: z.enum(functionResults).default('not-tested'),
	note: text('A pre-repair note').trim().max(300, 'Keep each note under 300 characters.').default('')
});
export const preRepairInput = z.object({
	couldNotPowerOn: z.boolean().default(false),
	items: z.record(z.string().regex(/^[a-z0-9-]{1,40}$/), answer).default({})
});
export type PreRepairInput = z.infer<typeof preRepairInput>;

/** Form fields: pre-result-<key>, pre-note-<key>, pre-power-off. Null when the section was absent. */
export function fromForm(form: FormData) {
	if (!form.has('pre-present')) return null;
	const items: Record<string, { result: unknown; note: unknown }> = {};
	for (const [name, value] of form) {
		const m = /^pre-(result|note)-(.+)$/.exec(name);
		if (!m) continue;
		items[m[2]] ??= { result: undefined, note: undefined };
		items[m[2]][m[1] as 'result' | 'note'] = String(value) || undefined;
	}
	return preRepairInput.safeParse({ couldNotPowerOn: form.get('pre-power-off') === 'on', items });
}

/** Answers laid over the device's items; "could not power on" marks every item not tested. */
export function build(
	defs: readonly FunctionTestDef[],
	input: PreRepairInput,
	by: string | null,
	at = new Date()
): PreRepairTest {
	return {
		couldNotPowerOn: input.couldNotPowerOn,
		items: defs.map((d) => {
			const a = input.items[d.key];
			return input.couldNotPowerOn
				? { key: d.key, label: d.label, result: 'not-tested' as const, note: COULD_NOT_POWER_ON }
				: { key: d.key, label: d.label, result: a?.result ?? 'not-tested', note: a?.note ?? '' };
		}),
		at: at.toISOString(),
		by
	};
}

/** The pre-repair items for a maker's model (after-only items left out). */
export async function itemsFor(maker: string, model: string) {
	return functionTestsFor(await capabilitiesOf(maker, model), 'before');
}

/** Records (or replaces) the pre-repair test of a job that is not yet being repaired. */
export async function save(jobId: string, input: PreRepairInput, by: string | null) {
	const db = await getDb();
	return db.transaction(async (tx) => {
		const job = await jobs.lockJob(tx, jobId).catch(() => {
			throw new RuleError(404, 'not-found', 'No job with this id.');
		});
		if (!preRepairEditable.includes(job.status))
			throw new RuleError(
				409,
				'repair-started',
				'The repair has started: what worked when the phone came in can no longer be changed.'
			);
		const defs = functionTestsFor(await capabilitiesOf(job.maker, job.model, tx), 'before');
		const test = build(defs, input, by);
		await tx
			.update(jobsTable)
			.set({ preRepairTest: test, updatedAt: new Date() })
			.where(eq(jobsTable.id, jobId));
		await record(tx, {
			actorId: by,
			action: 'job.pre-repair-test',
			targetType: 'job',
			targetId: jobId,
			details: summary(test)
		});
		return test;
	});
}

/** What the audit record keeps: counts, and the keys that did not work. */
export function summary(test: PreRepairTest) {
	return {
		couldNotPowerOn: test.couldNotPowerOn,
		failed: test.items.filter((i) => i.result === 'fail').map((i) => i.key),
		tested: test.items.filter((i) => i.result !== 'not-tested').length,
		of: test.items.length
	};
}
