/**
 * The address customers (and, in the demo, the local payment fake) reach the app at: PUBLIC_BASE_URL
 * when the app sits behind a proxy with another public name, else adapter-node's ORIGIN, else
 * localhost on PORT. Used for links in e-mails and for checkout return addresses.
 */
import { env } from '$lib/server/env';

export function publicBaseUrl(): string {
	const { PUBLIC_BASE_URL, ORIGIN, PORT } = env();
	const raw = PUBLIC_BASE_URL || ORIGIN || `http://localhost:${PORT}`;
	return raw.replace(/\/+$/, '');
}

/** An absolute address for a path of this app, e.g. absoluteUrl('/r/abc'). */
export function absoluteUrl(path: string): string {
	return new URL(path, publicBaseUrl() + '/').toString();
}
