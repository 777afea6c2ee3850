// A small shop in the in-memory database for the security specs: one member per role, a job with a
// run, a photo, a draft, a report link and a queued mail, so every route can be called with real ids.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { getDb } from '$lib/server/db';
import { imeiCheckDigit } from '$lib/domain/identifiers';
import { makeJobIntake } from '$lib/schemas/job';
import * as staff from '$lib/server/staff/queries';
import * as jobs from '$lib/server/jobs/queries';
import * as runs from '$lib/server/runs/queries';
import * as photos from '$lib/server/photos/queries';
import * as library from '$lib/server/flows/queries';
import * as authoring from '$lib/server/flows/authoring';
import * as links from '$lib/server/reports/links';
import { seedSymptoms } from '$lib/server/symptoms/queries';
import { enqueue } from '$lib/server/mail/queue';
import { png } from '$lib/server/photos/fixtures';
import type { Role } from '$lib/roles';

export const FLOW = 'restart-loop-after-liquid';
export const PASSWORD = 'harbour-lantern-42';

export type Member = { id: string; name: string; email: string; role: Role };

export type World = {
	tech: Member;
	otherTech: Member;
	senior: Member;
	/** Wrote the draft: the four-eyes rule keeps an author from approving their own. */
	author: Member;
	lead: Member;
	jobId: string;
	unassignedJobId: string;
	runId: string;
	photoId: string;
	draftId: string;
	versionId: string;
	token: string;
	mailId: string;
};

export async function member(name: string, email: string, role: Role): Promise<Member> {
	const u = await staff.create(null, { name, email, role, password: PASSWORD, mustChangePassword: false });
	return { id: u.id, name: u.name, email: u.email, role };
}

export function intake(n = 1) {
	const body14 = `0044000000000${n}`.slice(-14); // invented test IMEI body, check digit computed
	return makeJobIntake().parse({
		customerName: 'Orla Fenwick',
		customerEmail: 'orla@customer.test',
		customerPhone: '+00 555 0142',
		maker: 'Corvana',
		model: 'Tern 5',
		imei: `${body14}${imeiCheckDigit(body14)}`,
		symptoms: ['restart-loop'],
		liquid: 'fresh',
		submerged: false,
		passcodeStatus: 'withheld',
		consentToOpen: true
	});
}

export async function buildWorld(): Promise<World> {
	const db = await getDb();
	const tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-world-'));
	fs.copyFileSync(path.resolve('flows', `${FLOW}.flow.yaml`), path.join(tmp, `${FLOW}.flow.yaml`));
	await library.importFromFiles(tmp);
	// As at start-up: the catalogue is seeded before any request, so a refused one changes nothing.
	await seedSymptoms();
	fs.rmSync(tmp, { recursive: true, force: true });

	const tech = await member('Mira Saltmarsh', 'mira@shop.test', 'technician');
	const otherTech = await member('Ilya Brackwater', 'ilya@shop.test', 'technician');
	const senior = await member('Ness Tiller', 'ness@shop.test', 'senior');
	const author = await member('Wren Hollowell', 'wren@shop.test', 'senior');
	const lead = await member('Rook Alderwood', 'rook@shop.test', 'lead');

	const job = await jobs.create(tech.id, intake(1));
	await jobs.assignTechnician(job.id, tech.id, lead.id);
	const unassigned = await jobs.create(tech.id, intake(2));
	const run = await runs.start(job.id, FLOW, tech);
	const photo = await photos.add(
		tech.id,
		{ jobId: job.id },
		{ bytes: await png(), source: 'phone', caption: 'Board' }
	);
	const published = await library.currentPublished(FLOW);
	const draft = await authoring.createDraft(author, { fromVersionId: published!.id });
	const { token } = await db.transaction((tx) => links.create(tx, job.id, lead.id, 14));
	const mail = await enqueue(db, {
		to: 'orla@customer.test',
		subject: 'Your repair',
		text: 'Hello',
		template: 'test'
	} as Parameters<typeof enqueue>[1]);
	return {
		tech,
		otherTech,
		senior,
		author,
		lead,
		jobId: job.id,
		unassignedJobId: unassigned.id,
		runId: run.id,
		photoId: photo.photo.id,
		draftId: draft.id,
		versionId: published!.id,
		token,
		mailId: mail.id
	};
}
