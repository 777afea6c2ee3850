/** Isomorphic helpers for the symptom catalogue (server module: $lib/server/symptoms). */

export type CatalogueSymptom = {
	code: string;
	label: string;
	group: string;
	sortOrder: number;
	retired: boolean;
};
export type SymptomGroup<T extends CatalogueSymptom = CatalogueSymptom> = { group: string; symptoms: T[] };

/** "no-power" → "No power": the label a symptom gets when nobody has written one. */
export function labelFromCode(code: string) {
	const words = code.replace(/-/g, ' ');
	return words.charAt(0).toUpperCase() + words.slice(1);
}

/**
 * Rows grouped for display: groups in the order of their first symptom's sort order (so a group
 * moves as a whole when its symptoms do), symptoms by sort order then label.
 */
export function groupSymptoms<T extends CatalogueSymptom>(rows: T[]): SymptomGroup<T>[] {
	const sorted = [...rows].sort((a, b) => a.sortOrder - b.sortOrder || a.label.localeCompare(b.label));
	const groups = new Map<string, T[]>();
	for (const row of sorted) {
		const list = groups.get(row.group);
		if (list) list.push(row);
		else groups.set(row.group, [row]);
	}
	return [...groups].map(([group, symptoms]) => ({ group, symptoms }));
}
