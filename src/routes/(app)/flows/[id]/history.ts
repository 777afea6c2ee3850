/** One audit entry as the flow page shows it. */
export type HistoryEntry = {
	id: number;
	action: string;
	actorName: string | null;
	at: Date;
	details: Record<string, unknown>;
};

/**
 * Autosave writes an audit entry every few seconds: a run of saves by one person on one draft
 * (newest first, nothing else in between) shows as one line with the number of saves.
 */
export function collapseSaves(entries: HistoryEntry[]): HistoryEntry[] {
	const out: HistoryEntry[] = [];
	for (const e of entries) {
		const prev = out.at(-1);
		if (
			e.action === 'flow.draft.save' &&
			prev?.action === 'flow.draft.save' &&
			prev.actorName === e.actorName &&
			prev.details.draftId === e.details.draftId
		) {
			out[out.length - 1] = {
				...prev,
				details: { ...prev.details, times: Number(prev.details.times ?? 1) + 1 }
			};
			continue;
		}
		out.push(e);
	}
	return out;
}
