import { z } from 'zod';
import { text } from '$lib/schemas/text';

/**
 * The lead's /settings form. The tax rate is typed as a percentage with up to two decimals and
 * stored as basis points (20.5 % → 2050), so the stored rate is always a whole number.
 */
export const shopSettingsForm = z.object({
	shopName: text('The shop name').trim().min(2, 'At least 2 characters.').max(80, 'At most 80 characters.'),
	currency: z
		.string()
		.trim()
		.toUpperCase()
		.regex(/^[A-Z]{3}$/, 'A three-letter ISO 4217 code, e.g. EUR, GBP or USD.'),
	taxRatePercent: z
		.number({ error: 'Enter the rate as a number, e.g. 20 or 7.5.' })
		.min(0, 'The rate cannot be negative.')
		.max(100, 'At most 100 %.')
		.refine((n) => Number.isInteger(Math.round(n * 1e6) / 1e4), 'At most two decimals, e.g. 7.25.'),
	pricesIncludeTax: z.boolean(),
	linkLifetimeDays: z
		.number({ error: 'Enter a number of days.' })
		.int('Whole days.')
		.min(1, 'At least one day.')
		.max(90, 'At most 90 days.'),
	terms: text('The terms').max(10_000, 'Keep the terms under 10,000 characters.'),
	turnaroundDays: z
		.number({ error: 'Enter a number of days.' })
		.int('Whole days.')
		.min(0, 'Zero or more days.')
		.max(60, 'At most 60 days.'),
	quoteWaitHours: z
		.number({ error: 'Enter a number of hours.' })
		.int('Whole hours.')
		.min(1, 'At least one hour.')
		.max(720, 'At most 720 hours (30 days).'),
	backupEveryHours: z
		.number({ error: 'Enter a number of hours.' })
		.int('Whole hours.')
		.min(1, 'At least every hour.')
		.max(168, 'At least once a week (168 hours).'),
	backupKeep: z
		.number({ error: 'Enter a number of backups.' })
		.int('A whole number.')
		.min(1, 'Keep at least one.')
		.max(365, 'At most 365.'),
	queueWarnHours: z
		.number({ error: 'Enter a number of hours.' })
		.int('Whole hours.')
		.min(1, 'At least one hour.')
		.max(168, 'At most 168 hours (a week).')
});
export type ShopSettingsForm = z.infer<typeof shopSettingsForm>;

export const percentToBasisPoints = (p: number) => Math.round(p * 100);
export const basisPointsToPercent = (bp: number) => bp / 100;
