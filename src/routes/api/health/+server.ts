import { json } from '@sveltejs/kit';
import { sql } from 'drizzle-orm';
import { getHandle } from '$lib/server/db';
import { version } from '$app/environment';
import type { RequestHandler } from './$types';

export type HealthResponse = { ok: boolean; db: 'pglite' | 'postgres'; version: string };

// Public (allow-listed): used by monitors and the start-up benchmark; reveals no data.
export const GET: RequestHandler = async () => {
	const { db, kind } = await getHandle();
	try {
		await db.execute(sql`select 1`);
		return json({ ok: true, db: kind, version } satisfies HealthResponse);
	} catch {
		return json({ ok: false, db: kind, version } satisfies HealthResponse, { status: 503 });
	}
};
