import { queryClient as sharedQueryClient } from '$lib/query-client';
import { fetchInsight, filtersFrom, insightEndpoints, insightKey } from '$lib/insights/client';
import type { PageLoad } from './$types';

// Prefetch every panel with SvelteKit's fetch so the server-rendered page already has its figures;
// the page's createQuery calls read the same cache entries. Failures are left to the queries to show.
export const load: PageLoad = async ({ data, fetch, url }) => {
	const queryClient = sharedQueryClient();
	const filters = filtersFrom(url.searchParams);
	await Promise.all(
		insightEndpoints.map((endpoint) =>
			queryClient.prefetchQuery({
				queryKey: insightKey(endpoint, filters),
				queryFn: () => fetchInsight(fetch, endpoint, filters)
			})
		)
	);
	return { ...data, filters, queryClient };
};
