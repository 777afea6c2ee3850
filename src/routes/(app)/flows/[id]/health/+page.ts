import { queryClient as sharedQueryClient } from '$lib/query-client';
import { fetchHealth, healthKey } from '$lib/flow-health/client';
import type { PageLoad } from './$types';

// Prefetch with SvelteKit's fetch so the server-rendered page already has the table; the page's
// createQuery reads the same cache entry. A failure is left to the query to show.
export const load: PageLoad = async ({ data, fetch }) => {
	const queryClient = sharedQueryClient();
	if (data.version !== null)
		await queryClient.prefetchQuery({
			queryKey: healthKey(data.flow.id, data.version),
			queryFn: () => fetchHealth(fetch, data.flow.id, data.version!)
		});
	return { ...data, queryClient };
};
