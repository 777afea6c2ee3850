import { z } from 'zod';

/**
 * Ids are UUIDs (RFC 9562). A looser pattern such as /^[0-9a-f-]{36}$/ lets `------…` or 36 hex
 * digits through to PostgreSQL, which refuses them and the route answered 500.
 */
export const uuid = z.uuid();

export const isUuid = (value: unknown): value is string => uuid.safeParse(value).success;
