import fs from 'node:fs';
import { RuleError } from '$lib/server/errors';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { eq } from 'drizzle-orm';
import { getDb } from '$lib/server/db';
import { flows, flowVersions } from '$lib/server/db/schema';
import { toFlowYaml } from '$lib/flows/to-yaml';
import { person } from '$lib/server/staff/fixtures';
import * as library from './queries';
import * as authoring from './authoring';
import { exportVersion } from './export';
import type { Actor } from './authoring';

// Real in-memory PGlite migrated from drizzle/; the shipped flows are imported first, as at start-up.
const FLOW = 'no-power-after-liquid';
const out = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-export-'));
let ana: Actor, tom: Actor;

beforeAll(async () => {
	vi.spyOn(console, 'log').mockImplementation(() => {});
	await library.importFromFiles('flows');
	ana = await person('Ana', 'senior', 'io.test');
	tom = await person('Tom', 'technician', 'io.test');
});
afterAll(() => fs.rmSync(out, { recursive: true, force: true }));

async function versionCount() {
	const db = await getDb();
	return (await db.select({ id: flowVersions.id }).from(flowVersions)).length;
}

describe('export then import', () => {
	it('writes the newest published version into the folder, and a chosen one with --version', async () => {
		const v1 = (await library.getVersion(FLOW, 1))!;
		const done = await exportVersion(FLOW, undefined, out);
		expect(done).toEqual({
			file: path.join(out, `${FLOW}.flow.yaml`),
			flowId: FLOW,
			version: 1,
			checksum: v1.checksum
		});
		const text = fs.readFileSync(done.file, 'utf8');
		expect(text).toBe(toFlowYaml(v1.definition));
		expect(text.startsWith('# yaml-language-server: $schema=./flow.schema.json')).toBe(true);
		expect(fs.readdirSync(out)).toEqual([`${FLOW}.flow.yaml`]);
	});

	it('gives the same checksum when the exported file is imported as a draft', async () => {
		const v1 = (await library.getVersion(FLOW, 1))!;
		const text = fs.readFileSync(path.join(out, `${FLOW}.flow.yaml`), 'utf8');
		const imported = await authoring.importDraft(ana, text);
		expect(imported.problems).toEqual([]);
		expect(imported.newFlow).toBe(false);
		expect(imported.draft).toMatchObject({
			flowId: FLOW,
			status: 'draft',
			version: null,
			basedOnId: v1.id,
			authorId: ana.id,
			checksum: v1.checksum
		});
		expect(Object.keys(imported.draft.definition.steps)).toEqual(Object.keys(v1.definition.steps));
		// And the start-up import finds nothing new in the exported file.
		expect((await library.importFromFiles(out)).unchanged).toEqual([`${FLOW}.flow.yaml`]);
	});

	it('refuses an unknown flow, a version that does not exist and an id that is not one', async () => {
		await expect(exportVersion('no-such-flow', undefined, out)).rejects.toThrow(/no published version/);
		await expect(exportVersion(FLOW, 99, out)).rejects.toThrow(/no published or retired version 99/);
		await expect(exportVersion('../etc', undefined, out)).rejects.toThrow(/not a flow id/);
		await expect(exportVersion(FLOW, 0, out)).rejects.toThrow(/whole number/);
	});
});

describe('import of a .flow.yaml as a draft', () => {
	const v1Text = async () => toFlowYaml((await library.getVersion(FLOW, 1))!.definition);

	it('makes a new flow from a file with a new id, and keeps graph problems to show', async () => {
		const text = (await v1Text())
			.replace(`id: ${FLOW}`, 'id: imported-new-flow')
			.replace(/next: ([a-z0-9-]+)/, 'next: nowhere-at-all');
		const imported = await authoring.importDraft(ana, text);
		expect(imported.newFlow).toBe(true);
		expect(imported.draft).toMatchObject({ flowId: 'imported-new-flow', status: 'draft', basedOnId: null });
		expect(imported.problems.map((p) => p.code)).toContain('unknown-target');
		// The problem points at its line in the uploaded text.
		expect(imported.problems.find((p) => p.code === 'unknown-target')?.line).toBeGreaterThan(1);
		const db = await getDb();
		expect(await db.select().from(flows).where(eq(flows.id, 'imported-new-flow'))).toHaveLength(1);
	});

	it('refuses text that is not a flow, with its problems, and stores nothing', async () => {
		const before = await versionCount();
		const cases: [string, RegExp][] = [
			['id: [unclosed', /YAML/],
			[(await v1Text()).replace('title:', 'title: !!js/function "x" #'), /YAML|tag/i],
			['just a sentence', /./],
			[(await v1Text()).replace('steps:', 'stepz:'), /./]
		];
		for (const [text, problem] of cases) {
			const e = await authoring.importDraft(ana, text).catch((err: unknown) => err);
			expect(e).toBeInstanceOf(RuleError);
			const err = e as RuleError;
			expect(err.code).toBe('invalid');
			expect(err.message).toMatch(/nothing was imported/);
			expect(authoring.problemsOf(err).length).toBeGreaterThan(0);
			expect(
				authoring
					.problemsOf(err)
					.map((p) => p.message)
					.join('\n')
			).toMatch(problem);
		}
		const reserved = await authoring
			.importDraft(ana, (await v1Text()).replace(`id: ${FLOW}`, 'id: new'))
			.catch((err: unknown) => err);
		expect(reserved).toMatchObject({
			code: 'invalid',
			message: expect.stringMatching(/nothing was imported/)
		});
		const huge = `id: x\nsummary: "${'a'.repeat(600_000)}"\n`;
		await expect(authoring.importDraft(ana, huge)).rejects.toMatchObject({
			details: { problems: [expect.objectContaining({ message: expect.stringMatching(/at most 512000/) })] }
		});
		expect(await versionCount()).toBe(before);
	});

	it('refuses technicians', async () => {
		await expect(authoring.importDraft(tom, await v1Text())).rejects.toMatchObject({ code: 'forbidden' });
	});
});
