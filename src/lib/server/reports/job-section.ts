/** What the job page's Quote and Customer sections show (src/lib/components/quote/). */
import * as quotes from '$lib/server/quotes/queries';
import * as links from './links';
import { getMoney } from '$lib/server/settings/queries';

export async function customerSection(jobId: string) {
	const [versions, linkRows, payments, paidMinor, money] = await Promise.all([
		quotes.listForJob(jobId),
		links.listForJob(jobId),
		quotes.paymentsForJob(jobId),
		quotes.paidForJob(jobId),
		getMoney()
	]);
	const now = Date.now();
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
		payments: payments.map((p) => ({
			id: p.id,
			description: p.description,
			amountMinor: p.amountMinor,
			currency: p.currency.toUpperCase(),
			status: p.status,
			failureReason: p.failureReason,
			createdAt: p.createdAt,
			paidAt: p.paidAt
		})),
		paidMinor
	};
}
export type CustomerSection = Awaited<ReturnType<typeof customerSection>>;
