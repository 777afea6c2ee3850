import fs from 'node:fs';
import { beforeAll, describe, expect, it, vi } from 'vitest';
import { parse } from 'yaml';
import { imeiCheckDigit } from '$lib/domain/identifiers';
import { makeJobIntake } from '$lib/schemas/job';
import * as library from '$lib/server/flows/queries';
import * as jobs from '$lib/server/jobs/queries';
import * as runs from '$lib/server/runs/queries';
import { jobRunsSection } from '../../../routes/(app)/jobs/[id]/runs-section';
import * as staff from '$lib/server/staff/queries';
import * as catalogue from './queries';
import { OTHER_GROUP, SEED_GROUPS } from './seed';

// Real in-memory PGlite (DATA_DIR=memory://) migrated from drizzle/.
let tech: Awaited<ReturnType<typeof staff.create>>;
let senior: Awaited<ReturnType<typeof staff.create>>;
const imei = (body14: string) => `${body14}${imeiCheckDigit(body14)}`;
const intake = (symptoms: string[], n: number) =>
	makeJobIntake().parse({
		customerName: 'Isolde Ferrant',
		customerPhone: '+00 555 0142',
		maker: 'Corvana',
		model: 'Tern 6',
		// Invented IMEI bodies ("00" test reporting body, from memory), check digit computed.
		imei: imei(`004400000000${String(n).padStart(2, '0')}`),
		symptoms,
		liquid: 'fresh',
		submerged: false,
		passcodeStatus: 'given',
		consentToOpen: true
	});

/** Every `symptoms` tag written in flows/*.flow.yaml, read here independently of the module. */
function shippedTags(): string[] {
	return fs
		.readdirSync('flows')
		.filter((f) => f.endsWith('.flow.yaml'))
		.flatMap((f) => (parse(fs.readFileSync(`flows/${f}`, 'utf8')) as { symptoms: string[] }).symptoms);
}

beforeAll(async () => {
	vi.spyOn(console, 'log').mockImplementation(() => {});
	await library.importFromFiles('flows');
	senior = await staff.create(null, {
		name: 'Maren Holt',
		email: 'maren@cat.test',
		role: 'senior',
		password: 'senior-pass-1'
	});
	tech = await staff.create(null, {
		name: 'Ivo Lund',
		email: 'ivo@cat.test',
		role: 'technician',
		password: 'tech-pass-1'
	});
});

describe('seeding the catalogue', () => {
	it('covers every tag of the shipped flows, groups them, and adds nothing the second time', async () => {
		const first = await catalogue.seedSymptoms();
		const list = await catalogue.catalogue();
		const codes = new Set(list.map((s) => s.code));
		for (const tag of shippedTags()) expect(codes, tag).toContain(tag);
		// The seed offers presentations whether or not a flow covers them yet.
		for (const code of [
			'vibration',
			'flash-torch',
			'earpiece',
			'proximity-sensor',
			'nfc-fault',
			'corrosion-found'
		])
			expect(codes).toContain(code);
		expect(first.length).toBe(list.length);
		expect(await catalogue.seedSymptoms()).toEqual([]);
		// Groups come in the seeded order.
		const groups = [...new Set(list.map((s) => s.group))];
		expect(groups.slice(0, SEED_GROUPS.length)).toEqual(SEED_GROUPS.map((g) => g.group));
	});

	it('puts a flow tag the seed list lacks under "Other" with a label made from its code', async () => {
		const { flows } = await import('$lib/server/db/schema');
		const { getDb } = await import('$lib/server/db');
		const db = await getDb();
		await db.insert(flows).values({ id: 'odd-tag-flow', title: 'Odd', symptoms: ['speaker-crackle'] });
		expect(await catalogue.seedSymptoms()).toEqual(['speaker-crackle']);
		const row = (await catalogue.catalogue()).find((s) => s.code === 'speaker-crackle');
		expect(row).toMatchObject({ label: 'Speaker crackle', group: OTHER_GROUP, retired: false });
	});
});

describe('the catalogue in use', () => {
	it('keeps a senior’s rename across restarts and does not offer a retired symptom', async () => {
		await catalogue.update(senior.id, 'vibration', {
			label: 'Does not vibrate',
			group: 'Sound and voice',
			retired: false
		});
		await catalogue.seedSymptoms();
		expect((await catalogue.labels()).get('vibration')).toBe('Does not vibrate');

		await catalogue.update(senior.id, 'earpiece', {
			label: 'Caller hard to hear (earpiece)',
			group: 'Sound and voice',
			retired: true
		});
		expect((await catalogue.offered()).map((s) => s.code)).not.toContain('earpiece');
		expect((await catalogue.catalogue()).find((s) => s.code === 'earpiece')?.retired).toBe(true);
		expect((await catalogue.withoutFlow()).map((s) => s.code)).not.toContain('earpiece');
	});

	it('counts jobs per symptom with no flow, most first, and leaves covered symptoms out', async () => {
		await jobs.create(tech.id, intake(['proximity-sensor', 'no-sound'], 1));
		await jobs.create(tech.id, intake(['proximity-sensor'], 2));
		await jobs.create(tech.id, intake(['nfc-fault'], 3));
		const without = await catalogue.withoutFlow();
		expect(without.slice(0, 2).map((s) => [s.code, s.jobs])).toEqual([
			['proximity-sensor', 2],
			['nfc-fault', 1]
		]);
		expect(without.map((s) => s.code)).not.toContain('no-sound');
		const noSound = (await catalogue.usage()).find((s) => s.code === 'no-sound')!;
		expect(noSound).toMatchObject({ jobs: 1, flows: ['No sound or microphone fault after liquid'] });
	});

	it('suggests flows for a run best match first: most shared symptoms, then most runs', async () => {
		// no-sound-after-liquid is tagged no-sound and microphone-fault (two matches); restart-loop and
		// touch-fault match one each, and the one this shop has run (touch) comes before the one it
		// has not, though its title sorts after.
		const symptoms = ['restart-loop', 'touch-fault', 'no-sound', 'microphone-fault'];
		const earlier = await jobs.create(tech.id, intake(['touch-fault'], 4));
		await runs.start(earlier.id, 'touch-fault-after-liquid', tech);
		const job = await jobs.create(tech.id, intake(symptoms, 5));
		const section = await jobRunsSection(job);
		expect(section.suggested.map((s) => [s.id, s.runs])).toEqual([
			['no-sound-after-liquid', 0],
			['touch-fault-after-liquid', 1],
			['restart-loop-after-liquid', 0]
		]);
		expect(section.suggested[0].matched).toEqual([
			'No sound from the loudspeaker',
			'Microphone fault (others cannot hear)'
		]);
		expect(section.others.map((o) => o.id)).not.toContain('no-sound-after-liquid');
	});
});
