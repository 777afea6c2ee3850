import { json } from '@sveltejs/kit';
import type { FlowDefinition } from '$lib/flows/schema';
import { versionRef } from '$lib/schemas/flows';
import { requireUser } from '$lib/server/guards';
import * as flowLibrary from '$lib/server/flows/queries';
import type { RequestHandler } from './$types';

export type FlowVersionResponse = {
	flowId: string;
	version: number;
	status: 'published' | 'retired';
	checksum: string;
	publishedAt: string | null;
	retiredAt: string | null;
	/** Steps in authored order. */
	definition: FlowDefinition;
};

/** GET /api/flows/<id>/versions/<n> — one published (or retired) version with its definition. */
export const GET: RequestHandler = async (event) => {
	requireUser(event);
	const ref = versionRef.safeParse(event.params);
	if (!ref.success) {
		const issues = ref.error.issues.map((i) => ({ path: i.path.map(String).join('.'), message: i.message }));
		return json({ message: 'That is not a flow version.', issues }, { status: 400 });
	}
	const v = await flowLibrary.getVersion(ref.data.id, ref.data.version);
	if (!v)
		return json(
			{ message: `Flow "${ref.data.id}" has no published version ${ref.data.version}.` },
			{ status: 404 }
		);
	const body: FlowVersionResponse = {
		flowId: v.flowId,
		version: v.version!,
		status: v.status as FlowVersionResponse['status'],
		checksum: v.checksum,
		publishedAt: v.publishedAt?.toISOString() ?? null,
		retiredAt: v.retiredAt?.toISOString() ?? null,
		definition: v.definition
	};
	return json(body);
};
