/**
 * Water resistance after opening: the adhesive and gaskets that keep liquid out are disturbed when a
 * phone is opened, so its water resistance is no longer assured unless new adhesive and seals are
 * fitted (common practice, no published source). The default terms and the customer report say so.
 */
import type { Severity } from '$lib/flows/schema';

export const WATER_RESISTANCE_NOTE =
	'Once a phone has been opened, its water resistance is no longer assured unless new adhesive and seals are fitted.';

/** Verdict severities whose repair opens the phone. */
const OPENING: readonly Severity[] = ['repair', 'replace', 'board-level'];

/**
 * Whether the report's repair opens the phone: the verdict's repair does, or the quote proposes
 * parts or labour (a diagnostic fee alone proposes no repair).
 */
export function opensPhone(severity: Severity | null, lines: readonly { kind: string }[]): boolean {
	if (severity && OPENING.includes(severity)) return true;
	return lines.some((l) => l.kind === 'parts' || l.kind === 'labour');
}
