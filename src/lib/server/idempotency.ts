import crypto from 'node:crypto';

/** JSON with object keys sorted, so the same body hashes the same whatever order its fields came in. */
function canonical(value: unknown): string {
	if (Array.isArray(value)) return `[${value.map(canonical).join(',')}]`;
	if (value && typeof value === 'object') {
		const entries = Object.entries(value)
			.filter(([, v]) => v !== undefined)
			.sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
		return `{${entries.map(([k, v]) => `${JSON.stringify(k)}:${canonical(v)}`).join(',')}}`;
	}
	return JSON.stringify(value);
}

/**
 * The SHA-256 of a request body's canonical JSON. Kept with what the request wrote (a run step's
 * `body_hash`), so the same idempotency key with a different body is told apart from a repeat.
 */
export function bodyHash(body: unknown) {
	return crypto.createHash('sha256').update(canonical(body)).digest('hex');
}

export const keyReusedMessage =
	'This idempotency key was already used for a different request. Send a new key for a new request; repeat a request only with exactly the same body.';
