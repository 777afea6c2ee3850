import { queryClient as sharedQueryClient } from '$lib/query-client';
import { listQueryFrom } from '$lib/schemas/job';
import { fetchJobs, jobsQueryKey } from '$lib/jobs/client';
import type { PageLoad } from './$types';

// Prefetch with SvelteKit's fetch so the server-rendered table already has its rows; the page's
// createQuery then reads the same cache entry. A failure is left to the query to show.
export const load: PageLoad = async ({ data, fetch, url }) => {
	const queryClient = sharedQueryClient();
	const query = listQueryFrom(url.searchParams);
	await queryClient.prefetchQuery({ queryKey: jobsQueryKey(query), queryFn: () => fetchJobs(fetch, query) });
	return { ...data, query, queryClient };
};
