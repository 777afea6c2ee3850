import { z } from 'zod';

// PostgreSQL refuses a NUL character in text and jsonb, and a lone UTF-16 surrogate cannot be
// written as UTF-8 (nor into jsonb); either made the server answer 500. Every string that is stored
// passes this rule at the edge, so the answer is a 400 that names the field.
const LONE_SURROGATE = /[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/;

/** True when PostgreSQL can store the string as text or inside jsonb. */
export function storable(s: string) {
	return !s.includes('\u0000') && !LONE_SURROGATE.test(s);
}

export function unstorableMessage(label: string) {
	return `${label} contains a character that cannot be stored (a NUL or a broken character pair). Remove it and try again.`;
}

/**
 * The shared rule for a stored string: `text('Notes').trim().max(4000)`. `label` names the field in
 * the message (the API's issue `path` names it too).
 */
export function text(label: string) {
	return z.string().refine(storable, { error: unstorableMessage(label) });
}

/** Every string in a JSON value (keys too) that `storable` refuses, as dotted paths. */
export function unstorablePaths(value: unknown, at = ''): string[] {
	if (typeof value === 'string') return storable(value) ? [] : [at || '(value)'];
	if (Array.isArray(value)) return value.flatMap((v, i) => unstorablePaths(v, at ? `${at}.${i}` : String(i)));
	if (value && typeof value === 'object') {
		return Object.entries(value).flatMap(([k, v]) => {
			const path = at ? `${at}.${k}` : k;
			return [...(storable(k) ? [] : [path]), ...unstorablePaths(v, path)];
		});
	}
	return [];
}

/** The same rule for a JSON document stored in a jsonb column (a flow definition, say). */
export function storableJson<T extends z.ZodType>(schema: T, label: string) {
	return schema.superRefine((value, ctx) => {
		for (const path of unstorablePaths(value)) {
			ctx.addIssue({
				code: 'custom',
				path: path.split('.'),
				message: unstorableMessage(`${label} (${path})`)
			});
		}
	});
}
