/**
 * The browser caches the service worker (src/service-worker.ts) fills, shared with the pages that
 * add to and clear them. Isomorphic names only: no code that runs on import.
 */

/**
 * The run pages of runs opened on this device, and their photos. Only the full HTML page is kept:
 * SvelteKit's __data.json answers depend on the page navigated from, and a client-side navigation
 * that fails falls back to a full page load, which the kept HTML answers.
 */
export const RUN_CACHE = 'tidemark-runs';
export const SHELL_PREFIX = 'tidemark-shell-';

/** /runs/<uuid>: kept for offline use (network first). */
export const runPagePath = /^\/runs\/[0-9a-f-]{36}$/;
/** A photo's thumbnail or display size: the same bytes for ever, so cache first. */
export const photoPath = /^\/photos\/[0-9a-f-]{36}\/(thumb|display)$/;

/** Keeps this run page for offline use, unless a copy is already kept (the worker refreshes it). */
export async function keepRunPage(path: string) {
	if (typeof caches === 'undefined' || !navigator.onLine) return;
	const cache = await caches.open(RUN_CACHE);
	if (await cache.match(path)) return;
	const response = await fetch(path);
	// A redirect (to sign-in) is not the run page: keep nothing rather than the wrong page.
	if (response.ok && !response.redirected) await cache.put(path, response);
}

/** A finished or abandoned run needs no offline copy. */
export async function dropRunPage(path: string) {
	if (typeof caches === 'undefined') return;
	const cache = await caches.open(RUN_CACHE);
	await cache.delete(path);
}

/** On sign-out: the kept pages carry the signed-in technician's session data. */
export async function forgetRunPages() {
	if (typeof caches !== 'undefined') await caches.delete(RUN_CACHE);
}
