import { fail } from '@sveltejs/kit';
import { message, setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { requireRole } from '$lib/server/guards';
import { record } from '$lib/server/audit';
import { getDb } from '$lib/server/db';
import * as settings from '$lib/server/settings/queries';
import { basisPointsToPercent, percentToBasisPoints, shopSettingsForm } from '$lib/schemas/settings';
import * as backups from '$lib/server/backup/queries';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	requireRole(event, 'lead');
	const [shop, money, report, workflow, backup, recentBackups, offline] = await Promise.all([
		settings.getShop(),
		settings.getMoney(),
		settings.getReport(),
		settings.getWorkflow(),
		settings.getBackups(),
		backups.recent(5),
		settings.getOffline()
	]);
	const form = await superValidate(
		{
			shopName: shop.name,
			currency: money.currency,
			taxRatePercent: basisPointsToPercent(money.taxRateBasisPoints),
			pricesIncludeTax: money.pricesIncludeTax,
			linkLifetimeDays: report.linkLifetimeDays,
			terms: report.terms,
			turnaroundDays: workflow.turnaroundDays,
			quoteWaitHours: workflow.quoteWaitHours,
			backupEveryHours: backup.everyHours,
			backupKeep: backup.keep,
			queueWarnHours: offline.queueWarnHours
		},
		zod4(shopSettingsForm)
	);
	return { form, backups: recentBackups };
};

export const actions: Actions = {
	default: async (event) => {
		const lead = requireRole(event, 'lead');
		const form = await superValidate(event.request, zod4(shopSettingsForm));
		if (!form.valid) return fail(400, { form });
		const d = form.data;
		if (!settings.moneySettingsSchema.shape.currency.safeParse(d.currency).success)
			return setError(form, 'currency', 'This currency code is not known; use e.g. EUR, GBP or USD.');
		await settings.setShop({ name: d.shopName });
		await settings.setMoney({
			currency: d.currency,
			taxRateBasisPoints: percentToBasisPoints(d.taxRatePercent),
			pricesIncludeTax: d.pricesIncludeTax
		});
		await settings.setReport({ linkLifetimeDays: d.linkLifetimeDays, terms: d.terms });
		await settings.setWorkflow({ turnaroundDays: d.turnaroundDays, quoteWaitHours: d.quoteWaitHours });
		await settings.setBackups({ everyHours: d.backupEveryHours, keep: d.backupKeep });
		await settings.setOffline({ queueWarnHours: d.queueWarnHours });
		await record(await getDb(), {
			actorId: lead.id,
			action: 'settings.update',
			targetType: 'settings',
			details: {
				currency: d.currency,
				taxRatePercent: d.taxRatePercent,
				linkLifetimeDays: d.linkLifetimeDays,
				turnaroundDays: d.turnaroundDays,
				quoteWaitHours: d.quoteWaitHours,
				backupEveryHours: d.backupEveryHours,
				backupKeep: d.backupKeep,
				queueWarnHours: d.queueWarnHours
			}
		});
		return message(form, 'Settings saved. New quotes use them; quotes already saved keep their own.');
	}
};
