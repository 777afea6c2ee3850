import { json } from '@sveltejs/kit';
import type { FlowProblem } from '$lib/flows/check';
import type { FlowDefinition } from '$lib/flows/schema';
import { FlowAuthoringError } from './authoring';
import type { StoredVersion } from './queries';

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
export type AuthoringErrorJson = { message: string; problems?: FlowProblem[]; current?: DraftJson };

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

const statusOf = { 'not-found': 404, forbidden: 403, conflict: 409, state: 409, invalid: 400 } as const;

/** A refusal as JSON; anything else is rethrown (a real server fault). */
export function authoringFailure(e: unknown): Response {
	if (!(e instanceof FlowAuthoringError)) throw e;
	const body: AuthoringErrorJson = { message: e.message };
	if (e.problems.length) body.problems = e.problems;
	if (e.current) body.current = draftJson(e.current);
	return json(body, { status: statusOf[e.code] });
}

export async function readJson(request: Request): Promise<unknown> {
	try {
		return await request.json();
	} catch {
		return undefined;
	}
}
