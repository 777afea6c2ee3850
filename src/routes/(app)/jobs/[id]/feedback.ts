import type { LineErrors } from '$lib/quotes/input';

/** What a customer-side action on the job page (quote, report, link, payment, refund) answered. */
export type SideFeedback = {
	action: string;
	ok: boolean;
	message: string;
	url?: string;
	paymentId?: string;
	amount?: string;
	reason?: string;
	lineErrors?: Record<number, LineErrors>;
} | null;
