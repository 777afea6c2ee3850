/**
 * A stored version written back as `flows/<id>.flow.yaml` (what `npm run flows:export` does).
 * The file is the version's definition in the authored layout; importing it again gives the same
 * checksum, so the start-up import sees nothing new.
 */
import { RuleError } from '$lib/server/errors';
import fs from 'node:fs';
import path from 'node:path';
import { toFlowYaml } from '$lib/flows/to-yaml';
import { kebabId } from '$lib/flows/schema';
import { currentPublished, flowsDir, getVersion } from './queries';

export type Exported = { file: string; flowId: string; version: number; checksum: string };

/** Writes the version (default: the newest published one) into `dir` and says where. */
export async function exportVersion(flowId: string, version?: number, dir = flowsDir()): Promise<Exported> {
	if (!kebabId.safeParse(flowId).success)
		throw new RuleError(
			400,
			'invalid',
			`"${flowId}" is not a flow id; ids are kebab-case, like restart-loop-after-liquid.`
		);
	if (version !== undefined && (!Number.isInteger(version) || version < 1))
		throw new RuleError(400, 'invalid', '--version must be a whole number from 1.');
	const found = version === undefined ? await currentPublished(flowId) : await getVersion(flowId, version);
	if (!found || found.version === null)
		throw new RuleError(
			404,
			'not-found',
			version === undefined
				? `Flow "${flowId}" has no published version to export.`
				: `Flow "${flowId}" has no published or retired version ${version}.`
		);
	fs.mkdirSync(dir, { recursive: true });
	const file = path.join(dir, `${flowId}.flow.yaml`);
	// Write beside the target and rename, so a reader (the app at start-up) never sees half a file.
	const tmp = `${file}.${process.pid}.tmp`;
	fs.writeFileSync(tmp, toFlowYaml(found.definition));
	fs.renameSync(tmp, file);
	return { file, flowId, version: found.version, checksum: found.checksum };
}
