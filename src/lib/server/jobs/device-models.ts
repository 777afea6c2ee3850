import { asc, ilike, or, sql } from 'drizzle-orm';
import { getDb } from '$lib/server/db';
import { deviceModels } from '$lib/server/db/schema/jobs';

/**
 * The reference list behind intake's maker/model suggestions. Every maker and model here is
 * invented for Tidemark; shops add their own by typing them (the intake fields are free text).
 */
export const seedModels: { maker: string; model: string }[] = [
	{ maker: 'Corvana', model: 'Tern 5' },
	{ maker: 'Corvana', model: 'Tern 6' },
	{ maker: 'Corvana', model: 'Tern 6 Pro' },
	{ maker: 'Halvard', model: 'Skerry S' },
	{ maker: 'Halvard', model: 'Skerry S Max' },
	{ maker: 'Nomi Devices', model: 'Brook 3' }
];

/** Fills an empty table; leaves a table with any rows alone. Returns how many rows it added. */
export async function seedDeviceModels(): Promise<number> {
	const db = await getDb();
	const [{ n }] = await db.select({ n: sql<number>`count(*)::int` }).from(deviceModels);
	if (n > 0) return 0;
	const rows = await db.insert(deviceModels).values(seedModels).onConflictDoNothing().returning();
	return rows.length;
}

export type DeviceModelSuggestion = { maker: string; model: string };

/** Makers and models matching `q` anywhere (case-insensitive), makers then models alphabetically. */
export async function search(q = '', limit = 50): Promise<DeviceModelSuggestion[]> {
	const db = await getDb();
	const text = q.trim();
	const like = `%${text.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
	return db
		.select({ maker: deviceModels.maker, model: deviceModels.model })
		.from(deviceModels)
		.where(
			text
				? or(
						ilike(deviceModels.maker, like),
						ilike(deviceModels.model, like),
						ilike(sql`${deviceModels.maker} || ' ' || ${deviceModels.model}`, like)
					)
				: undefined
		)
		.orderBy(asc(deviceModels.maker), asc(deviceModels.model))
		.limit(limit);
}
