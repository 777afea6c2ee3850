import { jsonb, pgTable, text } from 'drizzle-orm/pg-core';
import { timestamptz } from './columns';

/** Shop-wide settings as one row per key; each key's value shape is fixed by a zod schema in the code. */
export const settings = pgTable('settings', {
	key: text('key').primaryKey(),
	value: jsonb('value').notNull(),
	updatedAt: timestamptz('updated_at').notNull().defaultNow()
});
