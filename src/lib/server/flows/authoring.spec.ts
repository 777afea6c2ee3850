import { beforeAll, describe, expect, it, vi } from 'vitest';
import { RuleError } from '$lib/server/errors';
import { eq } from 'drizzle-orm';
import { getDb } from '$lib/server/db';
import { auditLog } from '$lib/server/db/schema';
import * as staff from '$lib/server/staff/queries';
import * as library from './queries';
import * as authoring from './authoring';
import type { Actor } from './authoring';

// Real in-memory PGlite migrated from drizzle/; the shipped flows are imported first, as at start-up.
const flowId = 'restart-loop-after-liquid';
let ana: Actor, ben: Actor, lea: Actor, tom: Actor;

async function person(name: string, role: Actor['role']): Promise<Actor> {
	const email = `${name.toLowerCase()}@shop.test`;
	const created = await staff.create(null, { name, email, role, password: `${name}-password-1` });
	return { id: created.id, role };
}

beforeAll(async () => {
	vi.spyOn(console, 'log').mockImplementation(() => {});
	await library.importFromFiles('flows');
	ana = await person('Ana', 'senior');
	ben = await person('Ben', 'senior');
	lea = await person('Lea', 'lead');
	tom = await person('Tom', 'technician');
});

const v1 = async () => (await library.getVersion(flowId, 1))!;

describe('draft lifecycle', () => {
	it('refuses technicians', async () => {
		await expect(authoring.createDraft(tom, { fromVersionId: (await v1()).id })).rejects.toMatchObject({
			code: 'forbidden'
		});
	});

	it('draft → in review → published as version 2, leaving version 1 as it was', async () => {
		const base = await v1();
		const draft = await authoring.createDraft(ana, { fromVersionId: base.id });
		expect(draft).toMatchObject({
			status: 'draft',
			version: null,
			revision: 1,
			basedOnId: base.id,
			authorId: ana.id,
			checksum: base.checksum
		});

		const edited = { ...draft.definition, title: 'Restarts in a loop after liquid (clearer title)' };
		const saved = await authoring.saveDraft(ana, draft.id, {
			revision: 1,
			definition: edited,
			changelog: 'Clearer title'
		});
		expect(saved.revision).toBe(2);
		expect(Object.keys(saved.definition.steps)).toEqual(Object.keys(base.definition.steps));

		const inReview = await authoring.submit(ana, draft.id);
		expect(inReview.status).toBe('in-review');
		await expect(
			authoring.saveDraft(ana, draft.id, { revision: inReview.revision, definition: edited })
		).rejects.toMatchObject({ code: 'state' });

		const published = await authoring.approve(ben, draft.id);
		expect(published).toMatchObject({ status: 'published', version: 2, reviewerId: ben.id });
		expect((await library.currentPublished(flowId))!.id).toBe(draft.id);
		expect((await library.getFlow(flowId))!.title).toBe(edited.title);
		const old = await v1();
		expect(old).toMatchObject({ status: 'published', checksum: base.checksum });

		// Published versions never change.
		await expect(
			authoring.saveDraft(ana, draft.id, { revision: published.revision, definition: edited })
		).rejects.toMatchObject({ code: 'state' });
		await expect(authoring.approve(lea, draft.id)).rejects.toMatchObject({ code: 'state' });

		const db = await getDb();
		const trail = await db.select().from(auditLog).where(eq(auditLog.targetId, flowId));
		const actions = trail.map((e) => e.action);
		for (const a of ['flow.draft.create', 'flow.draft.save', 'flow.submit', 'flow.approve', 'flow.publish'])
			expect(actions).toContain(a);
		expect(trail.find((e) => e.action === 'flow.publish')!).toMatchObject({
			actorId: ben.id,
			details: { version: 2 }
		});
	});

	it('four eyes: neither the author nor anyone who edited the draft may approve or send it back', async () => {
		const draft = await authoring.createDraft(ana, { fromVersionId: (await v1()).id });
		await authoring.saveDraft(ben, draft.id, {
			revision: 1,
			definition: { ...draft.definition, summary: 'Edited by Ben.' }
		});
		await authoring.submit(ana, draft.id);
		await expect(authoring.approve(ana, draft.id)).rejects.toMatchObject({
			code: 'forbidden',
			message: /You wrote this draft/
		});
		await expect(authoring.approve(ben, draft.id)).rejects.toMatchObject({
			code: 'forbidden',
			message: /You edited this draft/
		});
		await expect(authoring.sendBack(ana, draft.id, 'Looks fine')).rejects.toMatchObject({
			code: 'forbidden'
		});
		expect((await authoring.approve(lea, draft.id)).version).toBe(3);
	});

	it('refuses to submit a draft with problems, naming the step; a fixed draft goes through', async () => {
		const draft = await authoring.createDraft(ana, { fromVersionId: (await v1()).id });
		const def = structuredClone(draft.definition);
		const [stepId, step] = Object.entries(def.steps).find(([, s]) => s.kind === 'test')!;
		if (step.kind !== 'test') throw new Error('expected a test step');
		const goodNext = step.outcomes![0].next;
		step.outcomes![0].next = 'nowhere-step';
		const saved = await authoring.saveDraft(ana, draft.id, { revision: 1, definition: def });
		const refused = await authoring.submit(ana, draft.id).catch((e) => e);
		expect(refused).toBeInstanceOf(RuleError);
		expect(refused.status).toBe(400);
		expect(refused.code).toBe('invalid');
		expect(authoring.problemsOf(refused)).toContainEqual(
			expect.objectContaining({ code: 'unknown-target', step: stepId })
		);
		expect((await library.getVersionById(draft.id))!.status).toBe('draft');

		step.outcomes![0].next = goodNext;
		await authoring.saveDraft(ana, draft.id, { revision: saved.revision, definition: def });
		expect((await authoring.submit(ana, draft.id)).status).toBe('in-review');
	});

	it('send back returns the draft with the comment; it can be fixed and submitted again', async () => {
		const [draft] = (await library.openDrafts(flowId)).filter((d) => d.status === 'in-review');
		await expect(authoring.sendBack(ben, draft.id, '   ')).rejects.toMatchObject({ code: 'invalid' });
		const back = await authoring.sendBack(ben, draft.id, 'Say which connector first.');
		expect(back).toMatchObject({
			status: 'draft',
			reviewComment: 'Say which connector first.',
			reviewerId: ben.id
		});
		const saved = await authoring.saveDraft(ana, draft.id, {
			revision: back.revision,
			definition: back.definition
		});
		await authoring.submit(ana, draft.id);
		expect((await authoring.approve(ben, saved.id)).version).toBe(4);
	});
});

describe('optimistic locking', () => {
	it('a save naming an older revision is a conflict carrying the current draft; nothing is overwritten', async () => {
		const draft = await authoring.createDraft(ana, { fromVersionId: (await v1()).id });
		const mine = { ...draft.definition, summary: 'Ana’s wording.' };
		const theirs = { ...draft.definition, summary: 'Ben’s wording.' };
		await authoring.saveDraft(ben, draft.id, { revision: 1, definition: theirs });
		const conflict = await authoring
			.saveDraft(ana, draft.id, { revision: 1, definition: mine })
			.catch((e) => e);
		expect(conflict).toMatchObject({ code: 'conflict' });
		expect(authoring.currentOf(conflict)).toMatchObject({
			revision: 2,
			definition: { summary: 'Ben’s wording.' }
		});
		expect((await library.getVersionById(draft.id))!.definition.summary).toBe('Ben’s wording.');
		// Having seen theirs, Ana saves knowingly over revision 2.
		expect((await authoring.saveDraft(ana, draft.id, { revision: 2, definition: mine })).revision).toBe(3);
	});

	it('refuses a definition that is not a flow, or one that changes the flow id', async () => {
		const [draft] = (await library.openDrafts(flowId)).filter((d) => d.status === 'draft');
		const row = (await library.getVersionById(draft.id))!;
		const broken = await authoring
			.saveDraft(ana, draft.id, { revision: row.revision, definition: { title: 'x' } })
			.catch((e) => e);
		expect(broken).toMatchObject({ code: 'invalid' });
		expect(authoring.problemsOf(broken)[0].code).toBe('schema');
		await expect(
			authoring.saveDraft(ana, draft.id, {
				revision: row.revision,
				definition: { ...row.definition, id: 'another-id' }
			})
		).rejects.toMatchObject({ code: 'invalid' });
		expect((await library.getVersionById(draft.id))!.revision).toBe(row.revision);
	});
});

describe('new flows and retiring', () => {
	it('a new flow from nothing is a draft seniors see and technicians do not, until approved as version 1', async () => {
		const base = (await library.getVersion('no-sound-after-liquid', 1))!.definition;
		const definition = { ...base, id: 'brand-new-flow', title: 'A brand new flow' };
		const draft = await authoring.createDraft(ana, { definition });
		expect((await library.listLibrary('technician')).map((f) => f.id)).not.toContain('brand-new-flow');
		expect((await library.listLibrary('senior')).find((f) => f.id === 'brand-new-flow')).toMatchObject({
			current: null,
			openDrafts: 1
		});
		await expect(authoring.createDraft(ben, { definition })).rejects.toMatchObject({ code: 'conflict' });
		await authoring.submit(ana, draft.id);
		expect((await authoring.approve(lea, draft.id)).version).toBe(1);
		expect((await library.listLibrary('technician')).find((f) => f.id === 'brand-new-flow')).toMatchObject({
			current: 1
		});
	});

	it('retiring the newest version makes the one before it current; only published versions retire', async () => {
		expect((await library.currentPublished(flowId))!.version).toBe(4);
		const retired = await authoring.retire(lea, flowId, 4);
		expect(retired).toMatchObject({ status: 'retired', version: 4 });
		expect(retired.retiredAt).toBeInstanceOf(Date);
		expect((await library.currentPublished(flowId))!.version).toBe(3);
		await expect(authoring.retire(lea, flowId, 4)).rejects.toMatchObject({ code: 'state' });
		await expect(authoring.retire(lea, flowId, 99)).rejects.toMatchObject({ code: 'not-found' });
		await expect(authoring.retire(tom, flowId, 3)).rejects.toMatchObject({ code: 'forbidden' });
		expect((await library.publishedVersions(flowId)).map((v) => `${v.version}:${v.status}`)).toEqual([
			'4:retired',
			'3:published',
			'2:published',
			'1:published'
		]);
	});
});
