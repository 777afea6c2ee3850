/** What a customer-side action on the job page (report, link, payment, refund) answered. */
export type SideFeedback = {
	action: string;
	ok: boolean;
	message: string;
	url?: string;
	paymentId?: string;
	amount?: string;
	reason?: string;
} | null;
