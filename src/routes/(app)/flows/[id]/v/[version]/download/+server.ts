import { error } from '@sveltejs/kit';
import { toFlowYaml } from '$lib/flows/to-yaml';
import { versionRef } from '$lib/schemas/flows';
import { requireUser } from '$lib/server/guards';
import * as flowLibrary from '$lib/server/flows/queries';
import type { RequestHandler } from './$types';

/** A published version as a `.flow.yaml` file, with the schema comment editors validate against. */
export const GET: RequestHandler = async (event) => {
	requireUser(event);
	const ref = versionRef.safeParse(event.params);
	if (!ref.success) error(404, { message: ref.error.issues[0]?.message ?? 'No such version.' });
	const version = await flowLibrary.getVersion(ref.data.id, ref.data.version);
	if (!version)
		error(404, { message: `Flow "${ref.data.id}" has no published version ${ref.data.version}.` });
	return new Response(toFlowYaml(version.definition), {
		headers: {
			'content-type': 'application/yaml; charset=utf-8',
			'content-disposition': `attachment; filename="${version.flowId}.flow.yaml"`,
			'x-flow-version': String(version.version),
			'x-flow-checksum': version.checksum,
			'cache-control': 'private, max-age=0'
		}
	});
};
