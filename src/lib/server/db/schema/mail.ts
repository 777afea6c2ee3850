import { sql } from 'drizzle-orm';
import { check, index, integer, pgTable, text, uuid } from 'drizzle-orm/pg-core';
import { timestamptz } from './columns';

export const mailStatuses = ['queued', 'sending', 'sent', 'failed'] as const;
export type MailStatus = (typeof mailStatuses)[number];

/**
 * Every e-mail the app sends goes through this queue: a request only inserts a row (inside its own
 * transaction), the background worker sends it. `related_type`/`related_id` name what the mail is
 * about (e.g. 'job', id) as plain text, so any domain can link mails without a foreign key here.
 */
export const outgoingMail = pgTable(
	'outgoing_mail',
	{
		id: uuid('id').primaryKey().defaultRandom(),
		to: text('to').notNull(),
		subject: text('subject').notNull(),
		text: text('text').notNull(),
		html: text('html'),
		template: text('template').notNull(),
		relatedType: text('related_type'),
		relatedId: text('related_id'),
		status: text('status', { enum: mailStatuses }).notNull().default('queued'),
		attempts: integer('attempts').notNull().default(0),
		lastError: text('last_error'),
		nextAttemptAt: timestamptz('next_attempt_at').notNull().defaultNow(),
		createdAt: timestamptz('created_at').notNull().defaultNow(),
		/** When the worker last changed the row; a 'sending' row left behind by a crash is taken back after a while. */
		updatedAt: timestamptz('updated_at').notNull().defaultNow(),
		sentAt: timestamptz('sent_at'),
		/** The Message-ID the SMTP server accepted, to find the mail in the server's logs. */
		messageId: text('message_id')
	},
	(t) => [
		index('outgoing_mail_due_idx').on(t.status, t.nextAttemptAt),
		index('outgoing_mail_related_idx').on(t.relatedType, t.relatedId),
		index('outgoing_mail_created_idx').on(t.createdAt),
		check('outgoing_mail_status_check', sql`${t.status} in ('queued', 'sending', 'sent', 'failed')`),
		check('outgoing_mail_attempts_check', sql`${t.attempts} >= 0`)
	]
);

export type OutgoingMail = typeof outgoingMail.$inferSelect;
