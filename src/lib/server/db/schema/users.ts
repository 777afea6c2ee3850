import { sql } from 'drizzle-orm';
import {
	boolean,
	check,
	index,
	jsonb,
	primaryKey,
	pgTable,
	text,
	uniqueIndex,
	uuid,
	bigserial,
	integer
} from 'drizzle-orm/pg-core';
import { timestamptz } from './columns';
import { roles } from '../../../roles';

export const roleEnumValues = roles;

export const users = pgTable(
	'users',
	{
		id: uuid('id').primaryKey().defaultRandom(),
		name: text('name').notNull(),
		email: text('email').notNull(),
		role: text('role', { enum: roles }).notNull().default('technician'),
		passwordHash: text('password_hash').notNull(),
		disabled: boolean('disabled').notNull().default(false),
		/** Set when a lead issues a temporary password; the member is asked to choose their own. */
		mustChangePassword: boolean('must_change_password').notNull().default(false),
		/**
		 * Written into the session token at sign-in and compared on every request; bumped on sign-out,
		 * password change, role change and disabling, so every earlier token stops working at once.
		 */
		sessionGeneration: integer('session_generation').notNull().default(0),
		createdAt: timestamptz('created_at').notNull().defaultNow(),
		updatedAt: timestamptz('updated_at').notNull().defaultNow()
	},
	(t) => [
		uniqueIndex('users_email_lower_idx').on(sql`lower(${t.email})`),
		check('users_role_check', sql`${t.role} in ('technician', 'senior', 'lead')`)
	]
);

export const auditLog = pgTable(
	'audit_log',
	{
		id: bigserial('id', { mode: 'number' }).primaryKey(),
		actorId: uuid('actor_id').references(() => users.id),
		action: text('action').notNull(),
		targetType: text('target_type').notNull(),
		targetId: text('target_id'),
		details: jsonb('details').$type<Record<string, unknown>>().notNull().default({}),
		at: timestamptz('at').notNull().defaultNow()
	},
	(t) => [index('audit_log_target_idx').on(t.targetType, t.targetId), index('audit_log_at_idx').on(t.at)]
);

/**
 * Per member, when they last marked a list on Today as seen (e.g. 'overturned'): the list then
 * shows only what came after. One row per member and list.
 */
export const userSeen = pgTable(
	'user_seen',
	{
		userId: uuid('user_id')
			.notNull()
			.references(() => users.id, { onDelete: 'cascade' }),
		list: text('list').notNull(),
		seenAt: timestamptz('seen_at').notNull()
	},
	(t) => [primaryKey({ columns: [t.userId, t.list] })]
);

export type User = typeof users.$inferSelect;
export type AuditEntry = typeof auditLog.$inferSelect;
