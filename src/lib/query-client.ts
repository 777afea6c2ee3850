import { browser } from '$app/environment';
import { QueryClient } from '@tanstack/svelte-query';

let shared: QueryClient | undefined;

/**
 * The TanStack Query client of the pages that use it (jobs, intake, insights, flow health): one per
 * browser tab, so cached lists survive navigation; a new one for each server render (queries run in
 * the browser only, so a server render never shares a cache between requests). Only those pages
 * import it, so every other page, the run screen above all, ships without TanStack Query.
 */
export function queryClient(): QueryClient {
	if (browser) return (shared ??= create());
	return create();
}

function create() {
	return new QueryClient({
		defaultOptions: { queries: { enabled: browser, staleTime: 10_000, retry: 1 } }
	});
}
