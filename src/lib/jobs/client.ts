/**
 * Browser-and-server helpers for the job API, used by TanStack Query on the /jobs page and by its
 * load function (with SvelteKit's fetch, so the server-rendered page already has the data).
 */
import { listQueryString, type JobListQuery } from '$lib/schemas/job';
import type { DeviceModelsResponse, JobListResponse } from './api-types';

export const jobsQueryKey = (query: JobListQuery) => ['jobs', 'list', query] as const;

async function getJson<T>(fetchFn: typeof fetch, url: string): Promise<T> {
	const response = await fetchFn(url, { headers: { accept: 'application/json' } });
	if (!response.ok) {
		const body = (await response.json().catch(() => null)) as { message?: string } | null;
		throw new Error(body?.message ?? `The server answered ${response.status}.`);
	}
	return (await response.json()) as T;
}

export function fetchJobs(fetchFn: typeof fetch, query: JobListQuery) {
	return getJson<JobListResponse>(fetchFn, `/api/jobs${listQueryString(query)}`);
}

export function fetchDeviceModels(fetchFn: typeof fetch, q = '') {
	return getJson<DeviceModelsResponse>(
		fetchFn,
		`/api/device-models${q ? `?q=${encodeURIComponent(q)}` : ''}`
	);
}
