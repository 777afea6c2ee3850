/* eslint-disable svelte/prefer-svelte-reactivity -- these Dates are replaced each minute, never mutated */
import { browser } from '$app/environment';

/**
 * A shared minute clock for figures that age while a page stays open (urgency, "12 min ago",
 * overdue). On the server it is the moment of the request; in the browser it ticks once a minute.
 */
let now = $state(new Date());
let ticking = false;

export const clock = {
	get now(): Date {
		if (!browser) return new Date();
		if (!ticking) {
			ticking = true;
			setInterval(() => (now = new Date()), 60_000);
		}
		return now;
	}
};

/** "just now", "12 min ago", "3 h ago", "2 days ago". */
export function ago(at: Date | string, now: Date): string {
	const minutes = Math.max(0, Math.round((now.getTime() - new Date(at).getTime()) / 60_000));
	if (minutes < 1) return 'just now';
	if (minutes < 60) return `${minutes} min ago`;
	const hours = Math.floor(minutes / 60);
	if (hours < 48) return `${hours} h ago`;
	return `${Math.floor(hours / 24)} days ago`;
}
