/** Browser (and load-function) side of the flow-health API: the query key and the fetcher. */
import type { FlowHealthResponse } from './types';

export const healthKey = (flowId: string, version: number) => ['flow-health', flowId, version] as const;

export async function fetchHealth(
	fetcher: typeof fetch,
	flowId: string,
	version: number
): Promise<FlowHealthResponse> {
	const res = await fetcher(`/api/flows/${encodeURIComponent(flowId)}/health?version=${version}`);
	if (!res.ok) {
		const body = (await res.json().catch(() => null)) as { message?: string } | null;
		throw new Error(body?.message ?? `The server answered ${res.status}.`);
	}
	return res.json();
}
