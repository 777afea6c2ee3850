import { RuleError } from '$lib/server/errors';
import { desc, eq, sql } from 'drizzle-orm';
import { getDb } from '$lib/server/db';
import { outgoingMail, mailStatuses, type MailStatus } from '$lib/server/db/schema/mail';
import { record } from '$lib/server/audit';
import { wakeWorker } from './queue';

const listColumns = {
	id: outgoingMail.id,
	to: outgoingMail.to,
	subject: outgoingMail.subject,
	template: outgoingMail.template,
	relatedType: outgoingMail.relatedType,
	relatedId: outgoingMail.relatedId,
	status: outgoingMail.status,
	attempts: outgoingMail.attempts,
	lastError: outgoingMail.lastError,
	nextAttemptAt: outgoingMail.nextAttemptAt,
	createdAt: outgoingMail.createdAt,
	sentAt: outgoingMail.sentAt
};

export type OutboxRow = { [K in keyof typeof listColumns]: (typeof listColumns)[K]['_']['data'] };

/** Newest first; bodies are left out (the detail page reads them). */
export async function list(filter: { status?: MailStatus; limit?: number } = {}) {
	const db = await getDb();
	const q = db.select(listColumns).from(outgoingMail);
	return (filter.status ? q.where(eq(outgoingMail.status, filter.status)) : q)
		.orderBy(desc(outgoingMail.createdAt), desc(outgoingMail.id))
		.limit(filter.limit ?? 200);
}

export async function counts(): Promise<Record<MailStatus, number>> {
	const db = await getDb();
	const rows = await db
		.select({ status: outgoingMail.status, n: sql<number>`count(*)::int` })
		.from(outgoingMail)
		.groupBy(outgoingMail.status);
	const out = Object.fromEntries(mailStatuses.map((s) => [s, 0])) as Record<MailStatus, number>;
	for (const r of rows) out[r.status] = r.n;
	return out;
}

export async function get(id: string) {
	const db = await getDb();
	const [row] = await db.select().from(outgoingMail).where(eq(outgoingMail.id, id));
	return row;
}

/** Mails about one thing (e.g. a job), oldest first, for that thing's page. */
export async function forRelated(type: string, id: string) {
	const db = await getDb();
	return db
		.select(listColumns)
		.from(outgoingMail)
		.where(sql`${outgoingMail.relatedType} = ${type} and ${outgoingMail.relatedId} = ${id}`)
		.orderBy(outgoingMail.createdAt);
}

/**
 * Puts a failed mail back in the queue, due now, with a fresh set of attempts. The earlier error
 * stays visible until the next attempt replaces it; the audit log keeps how many attempts it had.
 */
export async function retryNow(actorId: string, id: string) {
	const db = await getDb();
	const updated = await db.transaction(async (tx) => {
		const [mail] = await tx.select().from(outgoingMail).where(eq(outgoingMail.id, id)).for('update');
		if (!mail) throw new RuleError(400, 'not-found', 'No mail with this id.');
		if (mail.status !== 'failed')
			throw new RuleError(
				400,
				'not-failed',
				`Only a failed mail can be retried; this one is ${mail.status}.`
			);
		const now = new Date();
		const [row] = await tx
			.update(outgoingMail)
			.set({ status: 'queued', attempts: 0, nextAttemptAt: now, updatedAt: now })
			.where(eq(outgoingMail.id, id))
			.returning({ id: outgoingMail.id, to: outgoingMail.to });
		await record(tx, {
			actorId,
			action: 'mail.retry',
			targetType: 'mail',
			targetId: id,
			details: { attempts: mail.attempts, lastError: mail.lastError }
		});
		return row;
	});
	wakeWorker();
	return updated;
}
