/**
 * The findings report of a job, in two cuts from one builder: `staff` (the counter print-out) and
 * `customer` (the private link). The customer cut names no staff member, shows no internal notes,
 * no other job, and only the last four digits of the IMEI.
 */
import { and, asc, desc, eq } from 'drizzle-orm';
import { getDb } from '$lib/server/db';
import { runs } from '$lib/server/db/schema/runs';
import { flowVersions } from '$lib/server/db/schema/flows';
import { attachments } from '$lib/server/db/schema/attachments';
import * as jobQueries from '$lib/server/jobs/queries';
import * as quoteQueries from '$lib/server/quotes/queries';
import { getMoney, getReport, getShop } from '$lib/server/settings/queries';
import { formatJobNumber, liquidLabels, symptomLabel } from '$lib/schemas/job';
import * as symptomCatalogue from '$lib/server/symptoms/queries';
import { quoteTotals, type QuoteLine } from '$lib/domain/money';
import { dataFate, type DataFate } from '$lib/domain/data-first';
import { opensPhone } from '$lib/domain/water-resistance';
import type { FlowDefinition, Severity } from '$lib/flows/schema';
import type { Quote } from '$lib/server/db/schema/quotes';
import { checklistResults } from '$lib/server/db/schema/checklists';
import { capabilitiesOf } from '$lib/server/jobs/device-models';
import { functionTestsFor, type FunctionResultValue } from '$lib/domain/functionTests';
import type { JobDetail } from '$lib/server/jobs/queries';

export type Audience = 'staff' | 'customer';

/** The verdict in words a customer understands. */
export const severityForCustomer: Record<Severity, string> = {
	'no-fault': 'We found no fault.',
	repair: 'The phone can be repaired by cleaning and repairing the affected parts.',
	replace: 'A part of the phone needs to be replaced.',
	'board-level': 'The main board needs a repair at component level.',
	uneconomic: 'A repair would probably cost more than the phone is worth.'
};

export type ReportQuote = {
	id: string;
	version: number;
	status: Quote['status'];
	lines: (QuoteLine & { lineMinor: number })[];
	proposal: string;
	currency: string;
	taxRateBasisPoints: number;
	pricesIncludeTax: boolean;
	netMinor: number;
	taxMinor: number;
	grossMinor: number;
	approvedName: string | null;
	approvedAt: Date | null;
	declinedName: string | null;
	declinedAt: Date | null;
};

export type Report = {
	audience: Audience;
	shop: { name: string };
	job: {
		id: string;
		number: string;
		device: string;
		identifier: string;
		identifierLabel: string;
		customerName: string;
		takenIn: Date;
		status: string;
	};
	reported: { symptoms: string[]; liquid: string; when: Date | null; submerged: boolean };
	verdict: {
		title: string;
		severity: Severity;
		inWords: string;
		risks: string;
		parts: string[];
		dataReachable: boolean | null;
		reachedAt: Date | null;
	} | null;
	photos: { id: string; caption: string; width: number; height: number; url: string; thumbUrl: string }[];
	/** What became of the customer's data; null when nothing is known and nobody asked (dataFate). */
	data: {
		fate: DataFate;
		/** Staff cut only: where the backup went or why not, and who recorded it. */
		note: string | null;
		recordedBy: string | null;
		recordedAt: Date | null;
	} | null;
	/** A repair that opens the phone is proposed or done: the report says water resistance is not assured. */
	waterResistance: boolean;
	quote: ReportQuote | null;
	/** True when a newer draft is being prepared (customer cut: no price shown meanwhile). */
	quoteRevising: boolean;
	/** Money kept: received minus refunds. */
	paidMinor: number;
	/** Refunds given back; what is still to pay is the total minus paid and refunded. */
	refundedMinor: number;
	currency: string;
	terms: string;
	/** Before (at intake) and after (the repair) per function; null when neither was recorded. */
	functionTest: {
		couldNotPowerOn: boolean;
		rows: {
			key: string;
			label: string;
			before: FunctionResultValue | null;
			after: FunctionResultValue | null;
			/** Staff cut: every note. Customer cut: only the reason an item was not tested. */
			note: string;
		}[];
	} | null;
};

/** "•••• 1234": enough for the customer to recognise their phone, useless to anyone else. */
export function maskIdentifier(value: string) {
	return `•••• ${value.slice(-4)}`;
}

function toReportQuote(q: Quote): ReportQuote {
	const totals = quoteTotals(q.lines as QuoteLine[], q);
	return {
		id: q.id,
		version: q.version,
		status: q.status,
		lines: totals.lines,
		proposal: q.proposal,
		currency: q.currency,
		taxRateBasisPoints: q.taxRateBasisPoints,
		pricesIncludeTax: q.pricesIncludeTax,
		netMinor: q.netMinor,
		taxMinor: q.taxMinor,
		grossMinor: q.grossMinor,
		approvedName: q.approvedName,
		approvedAt: q.approvedAt,
		declinedName: q.declinedName,
		declinedAt: q.declinedAt
	};
}

/**
 * Builds the report of one job. `photoBase` is where the customer cut's images are served
 * (e.g. `/r/<token>/photos`); the staff cut uses the signed-in photo route.
 */
export async function build(jobId: string, audience: Audience, photoBase = ''): Promise<Report | null> {
	const job = await jobQueries.get(jobId);
	if (!job) return null;
	const db = await getDb();
	const symptomWords = await symptomCatalogue.labels();
	const [shop, money, settings, versions, paidMinor, receivedMinor] = await Promise.all([
		getShop(),
		getMoney(),
		getReport(),
		quoteQueries.listForJob(jobId),
		quoteQueries.paidForJob(jobId),
		quoteQueries.receivedForJob(jobId)
	]);

	const [run] = await db
		.select({
			id: runs.id,
			verdictStep: runs.verdictStep,
			dataReachable: runs.dataReachable,
			finishedAt: runs.finishedAt,
			definition: flowVersions.definition
		})
		.from(runs)
		.innerJoin(flowVersions, eq(flowVersions.id, runs.flowVersionId))
		.where(and(eq(runs.jobId, jobId), eq(runs.status, 'completed')))
		.orderBy(desc(runs.finishedAt))
		.limit(1);
	let verdict: Report['verdict'] = null;
	const step = run?.verdictStep ? (run.definition as FlowDefinition).steps[run.verdictStep] : undefined;
	if (run && step?.kind === 'verdict') {
		verdict = {
			title: step.title,
			severity: step.verdict.severity,
			inWords: severityForCustomer[step.verdict.severity],
			risks: step.verdict.risks,
			parts: step.verdict.parts ?? [],
			dataReachable: run.dataReachable,
			reachedAt: run.finishedAt
		};
	}

	// What the job's runs proved about the data: reached in any run, or found unreachable.
	const reach = await db
		.select({ dataReachable: runs.dataReachable })
		.from(runs)
		.where(eq(runs.jobId, jobId));
	const reachable = reach.some((r) => r.dataReachable === true)
		? true
		: reach.some((r) => r.dataReachable === false)
			? false
			: null;
	const fate = dataFate(job, reachable);
	const staff = audience === 'staff';

	const shown = await db
		.select({
			id: attachments.id,
			caption: attachments.caption,
			width: attachments.width,
			height: attachments.height
		})
		.from(attachments)
		.where(and(eq(attachments.jobId, jobId), eq(attachments.shownToCustomer, true)))
		.orderBy(asc(attachments.createdAt), asc(attachments.id));
	const base = audience === 'customer' ? photoBase : '/photos';

	const visible = audience === 'customer' ? quoteQueries.customerVisible(versions) : (versions[0] ?? null);
	const identifier = job.imei ?? job.serial ?? '';
	return {
		audience,
		shop: { name: shop.name },
		job: {
			id: job.id,
			number: formatJobNumber(job.number),
			device: `${job.maker} ${job.model}`,
			identifier: audience === 'customer' ? maskIdentifier(identifier) : identifier,
			identifierLabel: job.imei ? 'IMEI' : 'Serial number',
			customerName: job.customer.name,
			takenIn: job.createdAt,
			status: job.status
		},
		reported: {
			// The catalogue's words (a retired symptom keeps its label); a code it lacks, spelled out.
			symptoms: job.symptoms.map((code) => symptomWords.get(code) ?? symptomLabel(code)),
			liquid: liquidLabels[job.liquid],
			when: job.exposedAt,
			submerged: job.submerged
		},
		verdict,
		data: fate
			? {
					fate,
					note: staff && job.dataOutcome ? job.dataNote : null,
					recordedBy: staff ? job.dataRecordedByName : null,
					recordedAt: job.dataOutcome ? job.dataRecordedAt : null
				}
			: null,
		// Said once: a v2 flow's verdict risks already say it in their own words.
		waterResistance:
			opensPhone(verdict?.severity ?? null, (visible?.lines as QuoteLine[] | undefined) ?? []) &&
			!/water resistance/i.test(verdict?.risks ?? ''),
		photos: shown.map((p) => ({
			...p,
			url: `${base}/${p.id}/display`,
			thumbUrl: `${base}/${p.id}/thumb`
		})),
		quote: visible ? toReportQuote(visible) : null,
		quoteRevising: audience === 'customer' && !visible && versions.length > 0,
		paidMinor,
		refundedMinor: receivedMinor - paidMinor,
		currency: visible?.currency ?? money.currency,
		terms: settings.terms,
		functionTest: await functionTestOf(db, job, run?.id ?? null, audience)
	};
}

/** Rows: the after-repair items of the device, with anything the pre-repair test had besides. */
async function functionTestOf(
	db: Awaited<ReturnType<typeof getDb>>,
	job: JobDetail,
	runId: string | null,
	audience: Audience
): Promise<Report['functionTest']> {
	const [saved] = runId
		? await db
				.select({ items: checklistResults.items })
				.from(checklistResults)
				.where(and(eq(checklistResults.runId, runId), eq(checklistResults.kind, 'function-test')))
		: [];
	const before = job.preRepairTest;
	if (!before && !saved) return null;
	const after = new Map((saved?.items ?? []).map((i) => [i.key, i]));
	const was = new Map((before?.items ?? []).map((i) => [i.key, i]));
	const defs = functionTestsFor(await capabilitiesOf(job.maker, job.model, db), 'after');
	const keys = [...defs.map((d) => ({ key: d.key, label: d.label }))];
	for (const i of before?.items ?? []) if (!keys.some((k) => k.key === i.key)) keys.push(i);
	return {
		couldNotPowerOn: before?.couldNotPowerOn ?? false,
		rows: keys.map(({ key, label }) => {
			const a = after.get(key);
			const b = was.get(key);
			const afterResult = (a?.result ?? null) as FunctionResultValue | null;
			const note =
				audience === 'staff'
					? [b?.note && `Before: ${b.note}`, a?.note && `After: ${a.note}`].filter(Boolean).join(' · ')
					: afterResult === 'not-tested'
						? (a?.note ?? '')
						: '';
			return { key, label, before: b?.result ?? null, after: afterResult, note };
		})
	};
}
