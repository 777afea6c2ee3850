import { eq } from 'drizzle-orm';
import { z } from 'zod';
import { getDb } from '$lib/server/db';
import { settings } from '$lib/server/db/schema';

export const shopSchema = z.object({ name: z.string().trim().min(2).max(80) });
export type Shop = z.infer<typeof shopSchema>;

const defaults = { shop: { name: 'Tidemark' } satisfies Shop };

export async function getShop(): Promise<Shop> {
	const db = await getDb();
	const [row] = await db.select().from(settings).where(eq(settings.key, 'shop'));
	const parsed = shopSchema.safeParse(row?.value);
	return parsed.success ? parsed.data : defaults.shop;
}

export async function setShop(shop: Shop) {
	const db = await getDb();
	const value = shopSchema.parse(shop);
	await db
		.insert(settings)
		.values({ key: 'shop', value })
		.onConflictDoUpdate({ target: settings.key, set: { value, updatedAt: new Date() } });
}
