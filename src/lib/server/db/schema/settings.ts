import { jsonb, pgTable, text, timestamp } from 'drizzle-orm/pg-core';

/** Shop-wide settings as one row per key; each key's value shape is fixed by a zod schema in the code. */
export const settings = pgTable('settings', {
	key: text('key').primaryKey(),
	value: jsonb('value').notNull(),
	updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow()
});
