import type { Severity } from '$lib/flows/schema';

/** Words and tone for a verdict's severity; the words carry the meaning, colour only groups. */
export const severityLabels: Record<Severity, string> = {
	'no-fault': 'No fault found',
	repair: 'Repair',
	replace: 'Replace a part',
	'board-level': 'Board-level repair',
	uneconomic: 'Uneconomic to repair'
};

export const severityTone: Record<Severity, { bar: string; badge: string }> = {
	'no-fault': { bar: 'border-ok', badge: 'bg-ok-bg text-ok' },
	repair: { bar: 'border-accent', badge: 'bg-accent/15 text-accent-text' },
	replace: { bar: 'border-highlight', badge: 'bg-highlight/15 text-highlight' },
	'board-level': { bar: 'border-caution', badge: 'bg-caution-bg text-caution' },
	uneconomic: { bar: 'border-danger', badge: 'bg-danger-bg text-danger' }
};
