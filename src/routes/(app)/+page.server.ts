import { fail } from '@sveltejs/kit';
import { message, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { requireRole, requireUser } from '$lib/server/guards';
import { act } from '$lib/server/http';
import * as today from '$lib/server/today/queries';
import * as shop from '$lib/server/today/lead';
import * as settings from '$lib/server/settings/queries';
import * as flowHealth from '$lib/server/flow-health/queries';
import * as backups from '$lib/server/backup/queries';
import { takeJob } from '$lib/schemas/job';
import { historyStatus } from '$lib/server/demo/history-status';
import type { Actions, PageServerLoad } from './$types';

/** Midnight of the server's day: "today" for intake and collections. */
const startOfDay = (now: Date) => new Date(now.getFullYear(), now.getMonth(), now.getDate());

async function bench(userId: string, now: Date) {
	const [runs, mine, unassigned] = await Promise.all([
		today.runsInProgress(userId),
		today.myJobs(userId, now),
		today.unassigned(now)
	]);
	return { runs, queue: mine.queue, waiting: mine.waiting, unassigned };
}

async function review(userId: string, now: Date) {
	const [reviews, sentBack, overturned, standouts] = await Promise.all([
		today.reviewsWaiting(userId),
		today.sentBack(userId),
		today.overturnedFor(userId, now),
		flowHealth.standouts(5)
	]);
	return { reviews, sentBack, overturned, standouts };
}

async function lead(now: Date) {
	const { quoteWaitHours } = await settings.getWorkflow();
	const dayStart = startOfDay(now);
	const [intake, collections, overdue, quotes, mail, rising, backup] = await Promise.all([
		shop.intakeSince(dayStart),
		shop.collections(dayStart),
		shop.overdue(now),
		shop.quotesWaiting(now, quoteWaitHours),
		shop.failedMail(),
		shop.rising(),
		backups.health(now)
	]);
	return { intake, collections, overdue, quotes, quoteWaitHours, mail, rising, backup };
}

export const load: PageServerLoad = async (event) => {
	const user = requireUser(event);
	const now = new Date();
	const role = user.role;
	// The lead runs the shop; a senior also works the bench, so they see both halves.
	const [benchLists, reviewLists, leadLists, reviewsForLead] = await Promise.all([
		role === 'lead' ? null : bench(user.id, now),
		role === 'senior' ? review(user.id, now) : null,
		role === 'lead' ? lead(now) : null,
		role === 'lead' ? today.reviewsWaiting(user.id) : null
	]);
	return {
		greeting: user.name.split(' ')[0],
		role,
		now,
		bench: benchLists,
		review: reviewLists,
		lead: leadLists,
		reviewsForLead,
		history: historyStatus()
	};
};

const takeAdapter = zod4(takeJob);

export const actions: Actions = {
	/** Take an unassigned job: it becomes mine unless someone took it first. */
	take: async (event) => {
		const user = requireRole(event, 'technician');
		const body = await event.request.formData();
		const form = await superValidate(body, takeAdapter, { id: `take-${String(body.get('jobId') ?? '')}` });
		if (!form.valid) return fail(400, { form });
		return act(form, async () => {
			await today.take(form.data.jobId, user.id);
			return message(form, 'The job is yours: it is now in your queue.');
		});
	},
	/** The overturned verdicts were seen: from now on the list starts here. */
	seenOverturned: async (event) => {
		const user = requireRole(event, 'senior');
		await today.markSeen(user.id, 'overturned');
		return { action: 'seenOverturned', message: 'Marked as seen.' };
	}
};
