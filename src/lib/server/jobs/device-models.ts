import { and, asc, eq, ilike, isNull, or, sql } from 'drizzle-orm';
import { getDb, type Tx } from '$lib/server/db';
import { deviceModels } from '$lib/server/db/schema/jobs';
import type { Capability } from '$lib/domain/functionTests';

/**
 * The reference list behind intake's maker/model suggestions. Every maker and model here is
 * invented for Tidemark; shops add their own by typing them (the intake fields are free text).
 */
export const seedModels: { maker: string; model: string; capabilities: Capability[] }[] = [
	// One rear camera, no NFC: the function test asks neither.
	{ maker: 'Corvana', model: 'Tern 5', capabilities: ['fingerprint', 'headphone-socket', 'compass'] },
	{
		maker: 'Corvana',
		model: 'Tern 6',
		capabilities: ['fingerprint', 'nfc', 'compass', 'rear-camera-2']
	},
	{
		maker: 'Corvana',
		model: 'Tern 6 Pro',
		capabilities: [
			'face-unlock',
			'nfc',
			'wireless-charging',
			'barometer',
			'compass',
			'rear-camera-2',
			'rear-camera-3'
		]
	},
	{ maker: 'Halvard', model: 'Skerry S', capabilities: ['fingerprint', 'compass', 'rear-camera-2'] },
	{
		maker: 'Halvard',
		model: 'Skerry S Max',
		capabilities: [
			'face-unlock',
			'fingerprint',
			'nfc',
			'wireless-charging',
			'barometer',
			'compass',
			'rear-camera-2',
			'rear-camera-3'
		]
	},
	// No fingerprint, no NFC, one rear camera.
	{ maker: 'Nomi Devices', model: 'Brook 3', capabilities: ['headphone-socket'] }
];

/**
 * Fills an empty table; leaves a table with any rows alone, except that a seeded model whose
 * capabilities were never declared (a table filled before they existed) gets them. Returns how
 * many rows it added.
 */
export async function seedDeviceModels(): Promise<number> {
	const db = await getDb();
	const [{ n }] = await db.select({ n: sql<number>`count(*)::int` }).from(deviceModels);
	if (n > 0) {
		for (const m of seedModels)
			await db
				.update(deviceModels)
				.set({ capabilities: m.capabilities })
				.where(and(sameModel(m.maker, m.model), isNull(deviceModels.capabilities)));
		return 0;
	}
	const rows = await db.insert(deviceModels).values(seedModels).onConflictDoNothing().returning();
	return rows.length;
}

const sameModel = (maker: string, model: string) =>
	and(
		eq(sql`lower(${deviceModels.maker})`, maker.trim().toLowerCase()),
		eq(sql`lower(${deviceModels.model})`, model.trim().toLowerCase())
	);

/** The declared capabilities of a maker's model (case-insensitive), or null when none are known. */
export async function capabilitiesOf(
	maker: string,
	model: string,
	db?: Tx | Awaited<ReturnType<typeof getDb>>
): Promise<string[] | null> {
	const handle = db ?? (await getDb());
	const [row] = await handle
		.select({ capabilities: deviceModels.capabilities })
		.from(deviceModels)
		.where(sameModel(maker, model))
		.limit(1);
	return row?.capabilities ?? null;
}

export type DeviceModelSuggestion = { maker: string; model: string; capabilities: string[] | null };

/** Makers and models matching `q` anywhere (case-insensitive), makers then models alphabetically. */
export async function search(q = '', limit = 50): Promise<DeviceModelSuggestion[]> {
	const db = await getDb();
	const text = q.trim();
	const like = `%${text.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
	return db
		.select({
			maker: deviceModels.maker,
			model: deviceModels.model,
			capabilities: deviceModels.capabilities
		})
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
