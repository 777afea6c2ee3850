import type { FlowDefinition } from '$lib/flows/schema';
import type { StoredVersion } from './queries';

/** A draft or version as the flow API answers it (and as a save conflict carries it). */
export type DraftJson = {
	id: string;
	flowId: string;
	status: StoredVersion['status'];
	version: number | null;
	revision: number;
	checksum: string;
	changelog: string | null;
	reviewComment: string | null;
	updatedAt: string;
	definition: FlowDefinition;
};

export function draftJson(v: StoredVersion): DraftJson {
	return {
		id: v.id,
		flowId: v.flowId,
		status: v.status,
		version: v.version,
		revision: v.revision,
		checksum: v.checksum,
		changelog: v.changelog,
		reviewComment: v.reviewComment,
		updatedAt: v.updatedAt.toISOString(),
		definition: v.definition
	};
}
