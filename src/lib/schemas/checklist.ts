/**
 * The checklists page's three forms (repair items, function test, the verdict confirmation), as
 * superforms validates them on the server. The function test's fields follow the device model:
 * `result-<key>` and `note-<key>` per item, flat, so the form posts without JavaScript.
 */
import { z } from 'zod';
import { functionResults } from '$lib/domain/functionTests';
import { text } from './text';

export const repairForm = z.object({
	done: z
		.array(z.string().regex(/^r\d{1,3}$/, 'The repair checklist has changed; reload the page.'))
		.max(200)
		.default([])
});

type Item = { key: string; label: string };
export const resultField = (key: string) => `result-${key}`;
export const noteField = (key: string) => `note-${key}`;

export function functionTestForm(items: readonly Item[]) {
	return z.object(
		Object.fromEntries(
			items.flatMap((t) => [
				[resultField(t.key), z.enum(functionResults).nullable().default(null)],
				[
					noteField(t.key),
					text(`The note on ${t.label}`)
						.trim()
						.max(500, `Keep the note on ${t.label} under 500 characters.`)
						.default('')
				]
			])
		)
	);
}

export const confirmForm = z.object({
	// A string, not an enum: superforms would otherwise start the form at "yes", unasked.
	confirmed: z.string().refine((v) => v === 'yes' || v === 'no', { error: 'Choose yes or no.' }),
	note: text('The note').trim().max(2000, 'Keep the note under 2000 characters.').default('')
});

/** What a checklist form says after a save: `held` names the items keeping the job from ready. */
export type ChecklistMessage = { ok: boolean; text: string; held?: string[] };
