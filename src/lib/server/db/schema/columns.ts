import { timestamp } from 'drizzle-orm/pg-core';

/** A point in time (`timestamp with time zone`), read as a Date: every time column of the schema. */
export const timestamptz = (name: string) => timestamp(name, { withTimezone: true });
