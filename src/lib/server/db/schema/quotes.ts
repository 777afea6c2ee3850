import { sql } from 'drizzle-orm';
import { boolean, check, index, integer, jsonb, pgTable, text, uniqueIndex, uuid } from 'drizzle-orm/pg-core';
// Relative imports: drizzle-kit reads this file outside Vite, where $lib does not resolve.
import { timestamptz } from './columns';
import type { QuoteLine } from '../../../domain/money';
import { jobs } from './jobs';
import { users } from './users';

export const quoteStatuses = ['draft', 'sent', 'approved', 'declined', 'superseded'] as const;
export type QuoteStatus = (typeof quoteStatuses)[number];

/**
 * One version of a job's quote. A draft is edited in place; once the customer has been sent it,
 * a change makes the next version and marks this one superseded, so what the customer approved
 * stays readable. Totals are integer minor units computed by quoteTotals() with the tax settings
 * copied here when the version was saved (a later change of the shop's rate does not alter it).
 */
export const quotes = pgTable(
	'quotes',
	{
		id: uuid('id').primaryKey().defaultRandom(),
		jobId: uuid('job_id')
			.notNull()
			.references(() => jobs.id),
		version: integer('version').notNull(),
		status: text('status', { enum: quoteStatuses }).notNull().default('draft'),
		lines: jsonb('lines').$type<QuoteLine[]>().notNull(),
		/** What was done or is proposed, in words for the customer (markdown, sanitised when shown). */
		proposal: text('proposal').notNull().default(''),
		currency: text('currency').notNull(),
		taxRateBasisPoints: integer('tax_rate_basis_points').notNull(),
		pricesIncludeTax: boolean('prices_include_tax').notNull(),
		netMinor: integer('net_minor').notNull(),
		taxMinor: integer('tax_minor').notNull(),
		grossMinor: integer('gross_minor').notNull(),
		/** Confirmed by the payment webhook only. */
		paidMinor: integer('paid_minor').notNull().default(0),
		paidAt: timestamptz('paid_at'),
		sentAt: timestamptz('sent_at'),
		/** The name the customer typed to approve, and when. */
		approvedName: text('approved_name'),
		approvedAt: timestamptz('approved_at'),
		declinedName: text('declined_name'),
		declinedAt: timestamptz('declined_at'),
		createdBy: uuid('created_by').references(() => users.id),
		createdAt: timestamptz('created_at').notNull().defaultNow(),
		updatedAt: timestamptz('updated_at').notNull().defaultNow()
	},
	(t) => [
		uniqueIndex('quotes_job_version_idx').on(t.jobId, t.version),
		check('quotes_status_check', sql`${t.status} in ('draft', 'sent', 'approved', 'declined', 'superseded')`),
		check(
			'quotes_amounts_check',
			sql`${t.netMinor} >= 0 and ${t.taxMinor} >= 0 and ${t.grossMinor} >= 0 and ${t.paidMinor} >= 0`
		),
		check('quotes_currency_check', sql`${t.currency} ~ '^[A-Z]{3}$'`),
		check('quotes_approved_check', sql`(${t.status} = 'approved') = (${t.approvedAt} is not null)`)
	]
);

/**
 * A private link to a job's customer report. Only the SHA-256 of the token is stored: the token
 * itself exists in the e-mail and the customer's browser, so a copy of the database opens nothing.
 */
export const reportLinks = pgTable(
	'report_links',
	{
		id: uuid('id').primaryKey().defaultRandom(),
		jobId: uuid('job_id')
			.notNull()
			.references(() => jobs.id),
		/** Hex SHA-256 of the token. */
		tokenHash: text('token_hash').notNull(),
		expiresAt: timestamptz('expires_at').notNull(),
		revokedAt: timestamptz('revoked_at'),
		revokedBy: uuid('revoked_by').references(() => users.id),
		createdBy: uuid('created_by').references(() => users.id),
		createdAt: timestamptz('created_at').notNull().defaultNow(),
		lastOpenedAt: timestamptz('last_opened_at')
	},
	(t) => [
		uniqueIndex('report_links_token_hash_idx').on(t.tokenHash),
		index('report_links_job_idx').on(t.jobId, t.createdAt),
		check('report_links_hash_check', sql`${t.tokenHash} ~ '^[0-9a-f]{64}$'`)
	]
);

export type Quote = typeof quotes.$inferSelect;
export type ReportLink = typeof reportLinks.$inferSelect;
