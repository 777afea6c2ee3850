import { createHash } from 'node:crypto';

/**
 * Canonical JSON: object keys sorted by UTF-16 code units at every depth, no whitespace, keys whose
 * value is undefined left out. Arrays keep their order (outcome and range order carries meaning).
 * For the JSON a flow can hold (strings, finite numbers, booleans, arrays, plain objects) this is
 * the output of the JSON Canonicalization Scheme, RFC 8785, whose number form is JSON.stringify's.
 */
export function canonicalJson(value: unknown): string {
	return JSON.stringify(sortKeys(value));
}

function sortKeys(value: unknown): unknown {
	if (Array.isArray(value)) return value.map(sortKeys);
	if (value === null || typeof value !== 'object') return value;
	// fromEntries defines own properties, so even a key named "__proto__" stays data.
	return Object.fromEntries(
		Object.keys(value)
			.sort()
			.filter((key) => (value as Record<string, unknown>)[key] !== undefined)
			.map((key) => [key, sortKeys((value as Record<string, unknown>)[key])])
	);
}

export function sha256Hex(text: string): string {
	return createHash('sha256').update(text, 'utf8').digest('hex');
}

/** The identity of a flow definition: equal definitions give equal checksums, whatever the key order. */
export function checksumOf(definition: unknown): string {
	return sha256Hex(canonicalJson(definition));
}
