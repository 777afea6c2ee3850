/** What the job page's Quote and Customer sections show (./QuoteSection.svelte, ./CustomerSection.svelte). */
import * as quotes from '$lib/server/quotes/queries';
import * as links from '$lib/server/reports/links';
import { getMoney } from '$lib/server/settings/queries';
import * as refunds from '$lib/server/payments/refunds';

export async function customerSection(jobId: string) {
	const [versions, linkRows, payments, paidMinor, money] = await Promise.all([
		quotes.listForJob(jobId),
		links.listForJob(jobId),
		quotes.paymentsForJob(jobId),
		quotes.paidForJob(jobId),
		getMoney()
	]);
	const now = Date.now();
	const refundRows = await refunds.listForPayments(payments.map((p) => p.id));
	const taken = payments.filter((p) => p.status === 'paid' || p.status === 'refunded');
	return {
		quote: versions[0] ?? null,
		versions: versions.map((v) => ({
			id: v.id,
			version: v.version,
			status: v.status,
			grossMinor: v.grossMinor,
			currency: v.currency,
			approvedName: v.approvedName,
			approvedAt: v.approvedAt,
			declinedAt: v.declinedAt,
			updatedAt: v.updatedAt
		})),
		money,
		links: linkRows.map((l) => ({
			id: l.id,
			createdAt: l.createdAt,
			expiresAt: l.expiresAt,
			lastOpenedAt: l.lastOpenedAt,
			state: l.revokedAt ? 'revoked' : l.expiresAt.getTime() <= now ? 'expired' : 'live'
		})),
		payments: payments.map((p) => {
			const own = refundRows.filter((r) => r.paymentId === p.id);
			const held = own.filter((r) => r.status === 'pending').reduce((s, r) => s + r.amountMinor, 0);
			return {
				id: p.id,
				description: p.description,
				amountMinor: p.amountMinor,
				currency: p.currency.toUpperCase(),
				status: p.status,
				failureReason: p.failureReason,
				createdAt: p.createdAt,
				paidAt: p.paidAt,
				refundedMinor: p.refundedMinor,
				/** What a lead may still refund: paid − refunded − refunds waiting for the service. */
				refundableMinor: p.status === 'paid' ? Math.max(p.amountMinor - p.refundedMinor - held, 0) : 0,
				refunds: own.map((r) => ({
					id: r.id,
					amountMinor: r.amountMinor,
					status: r.status,
					reason: r.reason,
					failureReason: r.failureReason,
					createdAt: r.createdAt,
					refundedAt: r.refundedAt
				}))
			};
		}),
		/** Money taken and given back over the job's payments (net = paidMinor). */
		totals: {
			currency: (taken[0]?.currency ?? money.currency).toUpperCase(),
			receivedMinor: taken.reduce((s, p) => s + p.amountMinor, 0),
			refundedMinor: taken.reduce((s, p) => s + p.refundedMinor, 0)
		},
		paidMinor
	};
}
export type CustomerSection = Awaited<ReturnType<typeof customerSection>>;
