/// <reference types="@sveltejs/kit" />
/// <reference no-default-lib="true"/>
/// <reference lib="esnext" />
/// <reference lib="webworker" />
/**
 * Keeps the run screen usable when the shop's Wi-Fi drops: the app shell (every built script,
 * style and font, and the static files) is cached at install; the run pages a technician opens
 * are cached as they load (network first, so online they are always fresh); photo thumbnails seen
 * on a run page are kept too. Step answers are not the worker's business: the run screen keeps
 * them in IndexedDB and replays them itself (src/lib/offline/outbox.ts). Writes always go to the
 * network.
 */
import { build, files, version } from '$service-worker';
import { RUN_CACHE, SHELL_PREFIX, photoPath, runPagePath } from '$lib/offline/caches';

const sw = self as unknown as ServiceWorkerGlobalScope;
const SHELL = `${SHELL_PREFIX}${version}`;
const ASSETS = new Set([...build, ...files]);

sw.addEventListener('install', (event) => {
	event.waitUntil(
		caches
			.open(SHELL)
			.then((cache) => cache.addAll([...ASSETS]))
			.then(() => sw.skipWaiting())
	);
});

sw.addEventListener('activate', (event) => {
	event.waitUntil(
		(async () => {
			for (const key of await caches.keys())
				if (key.startsWith(SHELL_PREFIX) && key !== SHELL) await caches.delete(key);
			await sw.clients.claim();
		})()
	);
});

/** Network first; a good answer refreshes the kept copy, a failed fetch falls back to it. */
async function networkFirst(request: Request, path: string): Promise<Response> {
	const cache = await caches.open(RUN_CACHE);
	try {
		const response = await fetch(request);
		if (response.ok && !response.redirected) await cache.put(path, response.clone());
		return response;
	} catch (e) {
		const kept = await cache.match(path);
		if (kept) return kept;
		throw e;
	}
}

async function cacheFirst(cacheName: string, request: Request, path: string, keep = false) {
	const cache = await caches.open(cacheName);
	const kept = await cache.match(path);
	if (kept) return kept;
	const response = await fetch(request);
	if (keep && response.ok) await cache.put(path, response.clone());
	return response;
}

const offlinePage = () =>
	new Response(
		`<!doctype html><meta charset="utf-8"><meta name="viewport" content="width=device-width">
<title>Offline · Tidemark</title>
<body style="font-family:system-ui,sans-serif;max-width:36rem;margin:3rem auto;padding:0 1rem;line-height:1.5">
<h1>No connection</h1>
<p>This page was not kept on this device. Runs you opened here still work offline: go back to one,
or reload when the connection returns.</p></body>`,
		{ status: 503, headers: { 'content-type': 'text/html; charset=utf-8' } }
	);

sw.addEventListener('fetch', (event) => {
	const { request } = event;
	if (request.method !== 'GET') return;
	const url = new URL(request.url);
	if (url.origin !== sw.location.origin) return;
	const path = url.pathname;
	if (ASSETS.has(path)) return event.respondWith(cacheFirst(SHELL, request, path));
	if (runPagePath.test(path) && !url.search) return event.respondWith(networkFirst(request, path));
	if (photoPath.test(path) && /\/runs\//.test(request.referrer))
		return event.respondWith(cacheFirst(RUN_CACHE, request, path, true));
	if (request.mode === 'navigate') event.respondWith(fetch(request).catch(() => offlinePage()));
});
