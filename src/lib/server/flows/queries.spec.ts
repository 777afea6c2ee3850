import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { eq } from 'drizzle-orm';
import { getDb } from '$lib/server/db';
import { auditLog, flows, flowVersions } from '$lib/server/db/schema';
import * as staff from '$lib/server/staff/queries';
import { toFlowYaml } from '$lib/flows/to-yaml';
import { imeiCheckDigit } from '$lib/domain/identifiers';
import { makeJobIntake } from '$lib/schemas/job';
import * as jobs from '$lib/server/jobs/queries';
import * as runs from '$lib/server/runs/queries';
import * as library from './queries';
import { definitionColumns } from './queries';

// Real in-memory PGlite migrated from drizzle/ (DATA_DIR=memory:// in vite.config.ts); the tests
// below share one database and build on each other in order.
const shipped = path.resolve('flows');
const restartLoop = fs.readFileSync(path.join(shipped, 'restart-loop-after-liquid.flow.yaml'), 'utf8');
const noPower = fs.readFileSync(path.join(shipped, 'no-power-after-liquid.flow.yaml'), 'utf8');
const tmpDirs: string[] = [];

function folder(files: Record<string, string>) {
	const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-flows-'));
	tmpDirs.push(dir);
	for (const [name, text] of Object.entries(files)) fs.writeFileSync(path.join(dir, name), text);
	return dir;
}

// Opening and migrating the database takes seconds on a busy machine: do it under the hook timeout.
beforeAll(async () => {
	await getDb();
});

afterAll(() => {
	for (const dir of tmpDirs) fs.rmSync(dir, { recursive: true, force: true });
});

describe('import of flow files', () => {
	it('imports a file once: the same file again adds no version', async () => {
		const dir = folder({ 'restart-loop-after-liquid.flow.yaml': restartLoop });
		const first = await library.importFromFiles(dir);
		expect(first.imported).toEqual([
			{ flowId: 'restart-loop-after-liquid', version: 1, file: 'restart-loop-after-liquid.flow.yaml' }
		]);
		const again = await library.importFromFiles(dir);
		expect(again).toMatchObject({
			imported: [],
			unchanged: ['restart-loop-after-liquid.flow.yaml'],
			refused: []
		});
		const versions = await library.publishedVersions('restart-loop-after-liquid');
		expect(versions.map((v) => [v.version, v.status])).toEqual([[1, 'published']]);
		expect(versions[0].authorName).toBeNull();
	});

	it('keeps the steps in the order of the file, although jsonb sorts keys its own way', async () => {
		const v1 = await library.getVersion('restart-loop-after-liquid', 1);
		const inFile = [...restartLoop.matchAll(/^ {2}([a-z0-9-]+):$/gm)].map((m) => m[1]);
		expect(inFile.length).toBeGreaterThanOrEqual(8);
		expect(Object.keys(v1!.definition.steps)).toEqual(inFile);
		expect(v1!.checksum).toMatch(/^[0-9a-f]{64}$/);
	});

	it('makes a changed file the next published version and a comment-only change nothing', async () => {
		const changed = restartLoop.replace(/^title: (.*)$/m, 'title: $1 (revised)');
		expect(changed).not.toBe(restartLoop);
		const report = await library.importFromFiles(folder({ 'restart-loop-after-liquid.flow.yaml': changed }));
		expect(report.imported).toMatchObject([{ flowId: 'restart-loop-after-liquid', version: 2 }]);
		const current = await library.currentPublished('restart-loop-after-liquid');
		expect(current).toMatchObject({ version: 2, status: 'published' });
		expect(current!.definition.title).toMatch(/\(revised\)$/);
		expect((await library.getFlow('restart-loop-after-liquid'))!.title).toMatch(/\(revised\)$/);

		// Comments and key order are not part of the definition.
		const cosmetic = '# a note for authors\n' + changed;
		expect(
			(await library.importFromFiles(folder({ 'restart-loop-after-liquid.flow.yaml': cosmetic }))).imported
		).toEqual([]);
		// Going back to the first text is a version already stored: nothing new.
		expect(
			(await library.importFromFiles(folder({ 'restart-loop-after-liquid.flow.yaml': restartLoop }))).imported
		).toEqual([]);
		expect((await library.publishedVersions('restart-loop-after-liquid')).map((v) => v.version)).toEqual([
			2, 1
		]);
	});

	it("refuses a broken file with the checker's messages, imports the others, and audits each import", async () => {
		const errors = vi.spyOn(console, 'error').mockImplementation(() => {});
		const broken = noPower.replace('next: press-power-current', 'next: no-such-step');
		expect(broken).not.toBe(noPower);
		const dir = folder({
			'no-power-after-liquid.flow.yaml': broken,
			'not-yaml.flow.yaml': 'id: [unclosed',
			'restart-loop-after-liquid.flow.yaml': restartLoop,
			'face-unlock-after-liquid.flow.yaml': fs.readFileSync(
				path.join(shipped, 'face-unlock-after-liquid.flow.yaml'),
				'utf8'
			)
		});
		const report = await library.importFromFiles(dir);
		const logged = errors.mock.calls.map((c) => String(c[0])).join('\n');
		errors.mockRestore();
		expect(report.imported.map((i) => i.flowId)).toEqual(['face-unlock-after-liquid']);
		expect(report.refused.map((r) => r.file)).toEqual([
			'no-power-after-liquid.flow.yaml',
			'not-yaml.flow.yaml'
		]);
		const problem = report.refused[0].problems.find((p) => p.code === 'unknown-target');
		expect(problem).toMatchObject({ step: 'standby-current' });
		expect(problem!.message).toContain('no-such-step');
		expect(logged).toContain('no-power-after-liquid.flow.yaml: standby-current: unknown-target:');
		expect(report.refused[1].problems[0].code).toBe('schema');
		expect(await library.getFlow('no-power-after-liquid')).toBeUndefined();
		expect(library.lastImport()).toBe(report);

		const db = await getDb();
		const audit = await db.select().from(auditLog).where(eq(auditLog.action, 'flow.import'));
		expect(audit.map((a) => `${a.targetId}@${a.details.version}`).sort()).toEqual([
			'face-unlock-after-liquid@1',
			'restart-loop-after-liquid@1',
			'restart-loop-after-liquid@2'
		]);
	});

	it('export then import yields the same checksum: a downloaded version re-imports as nothing new', async () => {
		const current = (await library.currentPublished('restart-loop-after-liquid'))!;
		const text = toFlowYaml(current.definition);
		const report = await library.importFromFiles(folder({ 'restart-loop-after-liquid.flow.yaml': text }));
		expect(report).toMatchObject({
			imported: [],
			unchanged: ['restart-loop-after-liquid.flow.yaml'],
			refused: []
		});
	});

	it('survives a missing folder', async () => {
		const errors = vi.spyOn(console, 'error').mockImplementation(() => {});
		const report = await library.importFromFiles(path.join(os.tmpdir(), 'no-such-tidemark-folder'));
		errors.mockRestore();
		expect(report.error).toMatch(/cannot read the flows folder/);
		expect(report.imported).toEqual([]);
	});

	it('imports every shipped flow', async () => {
		const report = await library.importFromFiles(shipped);
		expect(report.refused).toEqual([]);
		expect(report.imported.length + report.unchanged.length).toBe(
			fs.readdirSync(shipped).filter((n) => n.endsWith('.flow.yaml')).length
		);
	});
});

describe('the library', () => {
	it('hides drafts and unpublished flows from technicians and counts them for seniors', async () => {
		const author = await staff.create(null, {
			name: 'Wren Addlestow',
			email: 'wren@shop.test',
			role: 'senior',
			password: 'wren-password-1'
		});
		const db = await getDb();
		const v1 = (await library.getVersion('face-unlock-after-liquid', 1))!;
		const draft = { ...v1.definition, title: 'A draft' };
		await db
			.insert(flowVersions)
			.values({ flowId: v1.flowId, status: 'draft', authorId: author.id, ...definitionColumns(draft) });
		await db.insert(flows).values({ id: 'only-a-draft', title: 'Only a draft', symptoms: ['wet'] });
		await db.insert(flowVersions).values({
			flowId: 'only-a-draft',
			status: 'draft',
			authorId: author.id,
			...definitionColumns({ ...draft, id: 'only-a-draft' })
		});

		const forTech = await library.listLibrary('technician');
		expect(forTech.map((f) => f.id)).not.toContain('only-a-draft');
		const face = forTech.find((f) => f.id === 'face-unlock-after-liquid')!;
		expect(face).toMatchObject({ current: 1, openDrafts: null, runs: 0 });

		const forSenior = await library.listLibrary('senior');
		expect(forSenior.find((f) => f.id === 'only-a-draft')).toMatchObject({ current: null, openDrafts: 1 });
		expect(forSenior.find((f) => f.id === 'face-unlock-after-liquid')).toMatchObject({
			current: 1,
			openDrafts: 1
		});
		expect(forSenior.find((f) => f.id === 'restart-loop-after-liquid')).toMatchObject({
			current: 2,
			openDrafts: 0
		});
		expect((await library.openDrafts('face-unlock-after-liquid'))[0]).toMatchObject({
			version: null,
			status: 'draft',
			authorName: 'Wren Addlestow'
		});
	});

	it('refuses a published row without a number, and a second version 1', async () => {
		const db = await getDb();
		const v1 = (await library.getVersion('face-unlock-after-liquid', 1))!;
		const cols = definitionColumns(v1.definition);
		await expect(
			db.insert(flowVersions).values({ flowId: v1.flowId, status: 'published', ...cols })
		).rejects.toThrow();
		await expect(
			db.insert(flowVersions).values({ flowId: v1.flowId, status: 'published', version: 1, ...cols })
		).rejects.toThrow();
		await expect(
			db.insert(flowVersions).values({ flowId: v1.flowId, status: 'draft', version: 3, ...cols })
		).rejects.toThrow();
	});

	it('suggests published flows by shared symptom tags, most shared first', async () => {
		const restart = (await library.getFlow('restart-loop-after-liquid'))!;
		expect(restart.symptoms.length).toBeGreaterThanOrEqual(2);
		const [a, b] = restart.symptoms;
		const found = await library.suggestBySymptoms([a, b.toUpperCase(), 'wet']);
		expect(found[0]).toMatchObject({ id: 'restart-loop-after-liquid', version: 2, matched: [a, b] });
		expect(found.map((f) => f.id)).not.toContain('only-a-draft');
		expect(await library.suggestBySymptoms(['no-such-symptom'])).toEqual([]);
		expect(await library.suggestBySymptoms([])).toEqual([]);
	});
});

describe('run counts in the library', () => {
	it('counts every run of every version of a flow, and 0 for a flow never run', async () => {
		const tech = await staff.create(null, {
			name: 'Ossian Brake',
			email: 'ossian@shop.test',
			role: 'technician',
			password: 'tech-password-1'
		});
		// Invented IMEI body ("00" test reporting body), check digit computed.
		const body = '00220000000002';
		const intake = makeJobIntake().parse({
			customerName: 'Ebba Quillfeather',
			customerPhone: '+00 555 0100',
			maker: 'Corvana',
			model: 'Tern 5',
			imei: `${body}${imeiCheckDigit(body)}`,
			symptoms: ['restart-loop'],
			liquid: 'salt',
			submerged: false,
			passcodeStatus: 'given',
			consentToOpen: true
		});
		for (let i = 0; i < 3; i++) {
			const job = await jobs.create(tech.id, intake);
			await runs.start(job.id, 'restart-loop-after-liquid', tech);
		}
		const job = await jobs.create(tech.id, intake);
		await runs.start(job.id, 'face-unlock-after-liquid', tech);

		const counts = await library.runsByFlow([
			'restart-loop-after-liquid',
			'face-unlock-after-liquid',
			'only-a-draft'
		]);
		expect([...counts]).toEqual([
			['restart-loop-after-liquid', 3],
			['face-unlock-after-liquid', 1],
			['only-a-draft', 0]
		]);
		expect(await library.runsByFlow([])).toEqual(new Map());
		const forTech = await library.listLibrary('technician');
		expect(forTech.find((f) => f.id === 'restart-loop-after-liquid')?.runs).toBe(3);
		expect(forTech.find((f) => f.id === 'face-unlock-after-liquid')?.runs).toBe(1);
	});
});
