import { z } from 'zod';
import type { DB, Tx } from '$lib/server/db';
import { outgoingMail } from '$lib/server/db/schema/mail';
import { headerText } from './templates';

export const mailMessageSchema = z.object({
	to: z.email().max(254),
	// Header lines: a line break here would start a header of the sender's choosing, so control
	// characters and line breaks are taken out whoever built the subject.
	subject: z.string().transform(headerText).pipe(z.string().min(1).max(200)),
	text: z.string().min(1).max(100_000),
	html: z.string().max(500_000).nullish(),
	template: z.string().min(1).max(60),
	related: z.object({ type: z.string().min(1).max(40), id: z.string().min(1).max(100) }).optional()
});
export type MailMessage = z.input<typeof mailMessageSchema>;

// The running worker (if any) registers itself here, so a new mail goes out without waiting for its next poll.
const g = globalThis as unknown as { __tidemarkMailWake?: (() => void) | null };
export function setWake(fn: (() => void) | null) {
	g.__tidemarkMailWake = fn;
}
export function wakeWorker() {
	g.__tidemarkMailWake?.();
}

/**
 * Queues a mail inside the caller's transaction: it is sent only if that transaction commits, and
 * never inside the request — the background worker sends it. Throws a ZodError for a bad message.
 */
export async function enqueue(tx: DB | Tx, message: MailMessage): Promise<{ id: string }> {
	const m = mailMessageSchema.parse(message);
	const [row] = await tx
		.insert(outgoingMail)
		.values({
			to: m.to,
			subject: m.subject,
			text: m.text,
			html: m.html ?? null,
			template: m.template,
			relatedType: m.related?.type ?? null,
			relatedId: m.related?.id ?? null
		})
		.returning({ id: outgoingMail.id });
	// The row is visible to the worker only after commit; a wake that comes too early just finds
	// nothing, and the next poll sends it.
	setTimeout(wakeWorker, 50).unref?.();
	return row;
}
