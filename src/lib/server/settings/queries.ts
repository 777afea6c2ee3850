import { eq } from 'drizzle-orm';
import { z } from 'zod';
import { text } from '$lib/schemas/text';
import { getDb } from '$lib/server/db';
import { settings } from '$lib/server/db/schema';
import { taxSettingsSchema } from '$lib/domain/money';

export const shopSchema = z.object({ name: text('The shop name').trim().min(2).max(80) });
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

// ── Money and the customer report (lead, /settings) ─────────────────────────────────────────────

/** A currency Intl knows (ISO 4217), upper case. */
const currencyCode = z
	.string()
	.trim()
	.transform((c) => c.toUpperCase())
	.refine((c) => /^[A-Z]{3}$/.test(c) && Intl.supportedValuesOf('currency').includes(c), {
		message: 'Use a three-letter ISO 4217 currency code, e.g. EUR, GBP or USD.'
	});

/** Currency and tax for quotes: 2000 basis points = 20 %. */
export const moneySettingsSchema = taxSettingsSchema.extend({ currency: currencyCode });
export type MoneySettings = z.infer<typeof moneySettingsSchema>;

export const DEFAULT_TERMS = `- Liquid damage can keep spreading after the phone dries: a part that works today may fail later, and we cannot promise how long a repair lasts beyond our own workmanship.
- Once a phone has been opened, its water resistance is no longer assured unless new adhesive and seals are fitted.
- Please do not charge the phone or switch it on until we have spoken.
- We never need your passcode to diagnose; some tests can only be done with the phone unlocked.
- Phones not collected within 90 days after we tell you they are ready may be recycled.`;

/** The private report link and the text every report ends with. */
export const reportSettingsSchema = z.object({
	linkLifetimeDays: z
		.number()
		.int('Whole days.')
		.min(1, 'At least one day.')
		.max(90, 'At most 90 days: a link should not outlive the job.'),
	/** Markdown, sanitised when shown. */
	terms: text('The terms').max(10_000, 'Keep the terms under 10,000 characters.')
});
export type ReportSettings = z.infer<typeof reportSettingsSchema>;

const moneyDefaults: MoneySettings = { currency: 'EUR', taxRateBasisPoints: 2000, pricesIncludeTax: true };
const reportDefaults: ReportSettings = { linkLifetimeDays: 14, terms: DEFAULT_TERMS };

async function readKey<T>(key: string, schema: z.ZodType<T>, fallback: T): Promise<T> {
	const db = await getDb();
	const [row] = await db.select().from(settings).where(eq(settings.key, key));
	const parsed = schema.safeParse(row?.value);
	return parsed.success ? parsed.data : fallback;
}

async function writeKey(key: string, value: unknown) {
	const db = await getDb();
	await db
		.insert(settings)
		.values({ key, value })
		.onConflictDoUpdate({ target: settings.key, set: { value, updatedAt: new Date() } });
}

export const getMoney = () => readKey('money', moneySettingsSchema, moneyDefaults);
export const getReport = () => readKey('report', reportSettingsSchema, reportDefaults);
export const setMoney = (value: MoneySettings) => writeKey('money', moneySettingsSchema.parse(value));
export const setReport = (value: ReportSettings) => writeKey('report', reportSettingsSchema.parse(value));

// ── The bench's day (lead, /settings; Today and intake read it) ─────────────────────────────────

/**
 * Turnaround: the promised date intake proposes is today plus this many calendar days. Quotes
 * waiting on the customer longer than `quoteWaitHours` show on the lead's Today. Both defaults are
 * common practice, no published source (a shop changes them in /settings).
 */
export const workflowSettingsSchema = z.object({
	turnaroundDays: z.number().int('Whole days.').min(0, 'Zero or more days.').max(60, 'At most 60 days.'),
	quoteWaitHours: z
		.number()
		.int('Whole hours.')
		.min(1, 'At least one hour.')
		.max(720, 'At most 720 hours (30 days).')
});
export type WorkflowSettings = z.infer<typeof workflowSettingsSchema>;
const workflowDefaults: WorkflowSettings = { turnaroundDays: 3, quoteWaitHours: 48 };

export const getWorkflow = () => readKey('workflow', workflowSettingsSchema, workflowDefaults);
export const setWorkflow = (value: WorkflowSettings) =>
	writeKey('workflow', workflowSettingsSchema.parse(value));

// ── Backups (lead, /settings; the app's scheduler reads it) ─────────────────────────────────────

/**
 * How often the app backs itself up into DATA_DIR/backups and how many files it keeps. Daily and
 * two weeks are common practice, no published source; a shop changes them in /settings.
 */
export const backupSettingsSchema = z.object({
	everyHours: z
		.number()
		.int('Whole hours.')
		.min(1, 'At least every hour.')
		.max(168, 'At least once a week (168 h).'),
	keep: z.number().int('A whole number of backups.').min(1, 'Keep at least one.').max(365, 'At most 365.')
});
export type BackupSettings = z.infer<typeof backupSettingsSchema>;
const backupDefaults: BackupSettings = { everyHours: 24, keep: 14 };

export const getBackups = () => readKey('backups', backupSettingsSchema, backupDefaults);
export const setBackups = (value: BackupSettings) => writeKey('backups', backupSettingsSchema.parse(value));

// ── The run screen without a connection (lead, /settings; the run page reads it) ────────────────

/**
 * Answers and photos waiting on a tablet longer than `queueWarnHours` raise a warning on the run
 * screen. Default 24 h: a shift and a night, long enough for a dropped Wi-Fi to come back and short
 * enough to be noticed the next working day (common practice, no published source).
 */
export const offlineSettingsSchema = z.object({
	queueWarnHours: z
		.number()
		.int('Whole hours.')
		.min(1, 'At least one hour.')
		.max(168, 'At most 168 hours (a week).')
});
export type OfflineSettings = z.infer<typeof offlineSettingsSchema>;
const offlineDefaults: OfflineSettings = { queueWarnHours: 24 };

export const getOffline = () => readKey('offline', offlineSettingsSchema, offlineDefaults);
export const setOffline = (value: OfflineSettings) => writeKey('offline', offlineSettingsSchema.parse(value));
