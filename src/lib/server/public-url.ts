/**
 * The address customers (and, in the demo, the local payment fake) reach the app at: PUBLIC_BASE_URL
 * when the app sits behind a proxy with another public name, else adapter-node's ORIGIN, else
 * localhost on PORT. Used for links in e-mails and for checkout return addresses.
 */
export function publicBaseUrl(): string {
	const raw =
		process.env.PUBLIC_BASE_URL?.trim() ||
		process.env.ORIGIN?.trim() ||
		`http://localhost:${process.env.PORT || 3000}`;
	return raw.replace(/\/+$/, '');
}

/** An absolute address for a path of this app, e.g. absoluteUrl('/r/abc'). */
export function absoluteUrl(path: string): string {
	return new URL(path, publicBaseUrl() + '/').toString();
}
