import { error } from '@sveltejs/kit';
import { diffVersions } from '$lib/flows/diff';
import { kebabId } from '$lib/flows/schema';
import { requireRole } from '$lib/server/guards';
import * as flowLibrary from '$lib/server/flows/queries';
import type { PageServerLoad } from './$types';
import { diffQuery } from './schema';

type Side = number | string;

export const load: PageServerLoad = async (event) => {
	requireRole(event, 'senior');
	const id = kebabId.safeParse(event.params.id);
	if (!id.success) error(404, { message: 'Flow ids are kebab-case, like restart-loop-after-liquid.' });
	const query = diffQuery.safeParse({
		a: event.url.searchParams.get('a') || undefined,
		b: event.url.searchParams.get('b') || undefined
	});
	if (!query.success) error(400, { message: query.error.issues[0]?.message ?? 'Bad version.' });

	const [flow, published, drafts] = await Promise.all([
		flowLibrary.getFlow(id.data),
		flowLibrary.publishedVersions(id.data),
		flowLibrary.openDrafts(id.data)
	]);
	if (!flow) error(404, { message: `There is no flow "${id.data}" in the library.` });

	// Without a choice: the newest version against the one before it.
	const newest = published[0]?.version ?? null;
	const b: Side | undefined = query.data.b ?? newest ?? undefined;
	const a: Side | undefined = query.data.a ?? (typeof b === 'number' && b > 1 ? b - 1 : undefined);
	const options = [...drafts, ...published].map((v) => ({
		value: v.version === null ? v.id : String(v.version),
		label:
			v.version === null
				? `Draft${v.status === 'in-review' ? ' in review' : ''}${v.authorName ? ` by ${v.authorName}` : ''}`
				: `Version ${v.version}${v.status === 'retired' ? ' (retired)' : ''}`
	}));
	if (a === undefined || b === undefined) return { flow, options, a: a ?? null, b: b ?? null, diff: null };

	const load = async (side: Side) => {
		const v =
			typeof side === 'number'
				? await flowLibrary.getVersion(id.data, side)
				: await flowLibrary.getVersionById(side);
		if (!v || v.flowId !== id.data)
			error(404, {
				message: `Flow "${id.data}" has no ${typeof side === 'number' ? `version ${side}` : 'such draft'}.`
			});
		return v;
	};
	const [va, vb] = await Promise.all([load(a), load(b)]);
	const name = (v: typeof va) => (v.version === null ? 'Draft' : `Version ${v.version}`);
	return {
		flow,
		options,
		a: String(a),
		b: String(b),
		names: { a: name(va), b: name(vb) },
		diff: diffVersions(va.definition, vb.definition)
	};
};
