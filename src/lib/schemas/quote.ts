/**
 * The job page's quote form, as superforms validates it. The lines post as four parallel lists
 * (every row's description, kind, quantity and price), so the form works without JavaScript; a
 * line's errors land at `unit[2]` and the like, beside the right row. Amounts are checked and
 * turned into minor units by $lib/quotes/input, in the shop's currency.
 */
import { z } from 'zod';
import { parseLines, type RawLine } from '$lib/quotes/input';
import { text } from './text';

const column = z.array(z.string().max(2000, 'This field is too long.')).max(100).default([]);

export const quoteFields = z.object({
	description: column,
	kind: column,
	quantity: column,
	unit: column,
	proposal: text('The proposal').max(5000, 'Keep the proposal under 5000 characters.').default('')
});
export type QuoteFields = z.infer<typeof quoteFields>;

/** The typed rows, one per line of the form. */
export function rowsOf(v: Pick<QuoteFields, 'description' | 'kind' | 'quantity' | 'unit'>): RawLine[] {
	return v.description.map((description, i) => ({
		description,
		kind: v.kind[i] ?? '',
		quantity: v.quantity[i] ?? '',
		unit: v.unit[i] ?? ''
	}));
}

/** The form's schema in the shop's currency: every line checked, its errors beside its fields. */
export function quoteForm(currency: string) {
	return quoteFields.superRefine((v, ctx) => {
		const parsed = parseLines(rowsOf(v), currency);
		if (parsed.ok) return;
		if (parsed.form) ctx.addIssue({ code: 'custom', message: parsed.form, path: [] });
		for (const [row, errors] of Object.entries(parsed.errors))
			for (const [field, message] of Object.entries(errors))
				ctx.addIssue({ code: 'custom', message, path: [field, Number(row)] });
		if (!parsed.form)
			ctx.addIssue({ code: 'custom', message: 'Some lines need a look; see the marked fields.', path: [] });
	});
}
