/**
 * The JSON bodies of the job API (`/api/jobs`, `/api/device-models`), shared by the routes that
 * answer them and the browser client that reads them (src/lib never imports from src/routes).
 */
import type { Jsonify } from '$lib/server/http';
import type { JobList } from '$lib/server/jobs/queries';
import type { DeviceModelSuggestion } from '$lib/server/jobs/device-models';

export type JobListResponse = Jsonify<JobList>;
export type JobCreatedResponse = { id: string; number: number; jobNumber: string };
export type DeviceModelsResponse = { models: DeviceModelSuggestion[] };
