import { beforeAll, describe, expect, it, vi } from 'vitest';
import { eq } from 'drizzle-orm';
import { imeiCheckDigit } from '$lib/domain/identifiers';
import { getDb } from '$lib/server/db';
import { auditLog } from '$lib/server/db/schema';
import * as library from '$lib/server/flows/queries';
import * as staff from '$lib/server/staff/queries';
import * as catalogue from '$lib/server/symptoms/queries';
import { POST as createJob } from '../../../api/jobs/+server';
import { load as intakeLoad } from '../../jobs/new/+page.server';
import { load as libraryLoad } from '../+page.server';
import { actions, load } from './+page.server';

// Real in-memory PGlite (DATA_DIR=memory://); the handlers called with a minimal RequestEvent.
type User = { id: string; name: string; email: string; role: 'technician' | 'senior' | 'lead' };
let sena: User, theo: User, lena: User;

async function person(name: string, role: User['role']): Promise<User> {
	const email = `${name.toLowerCase()}@symptoms.test`;
	const created = await staff.create(null, { name, email, role, password: `${name}-password-1` });
	return { id: created.id, name, email, role };
}

function event(user: User, path = '/flows/symptoms', init?: RequestInit) {
	const url = new URL(`http://shop.test${path}`);
	return {
		url,
		request: new Request(url, init),
		params: {},
		locals: { user },
		route: { id: '/(app)/flows/symptoms' },
		cookies: { get: () => undefined }
		// eslint-disable-next-line @typescript-eslint/no-explicit-any
	} as any;
}
const post = (user: User, fields: Record<string, string>) => {
	const body = new FormData();
	for (const [k, v] of Object.entries(fields)) body.set(k, v);
	return event(user, '/flows/symptoms', { method: 'POST', body });
};
type Page = { canEdit: boolean; groups: { group: string }[]; audit: { text: string }[] };
type Act = (e: unknown) => Promise<unknown>;
const add = (user: User, fields: Record<string, string>) => (actions.add as Act)(post(user, fields));
const update = (user: User, fields: Record<string, string>) => (actions.update as Act)(post(user, fields));

async function status(run: () => Promise<unknown>) {
	try {
		await run();
	} catch (e) {
		return (e as { status?: number }).status;
	}
	return 'no error';
}

const auditOf = async (code: string) =>
	(await (await getDb()).select().from(auditLog).where(eq(auditLog.targetId, code))).map((a) => a.action);

beforeAll(async () => {
	vi.spyOn(console, 'log').mockImplementation(() => {});
	vi.spyOn(console, 'error').mockImplementation(() => {});
	await library.importFromFiles('flows');
	sena = await person('Sena', 'senior');
	lena = await person('Lena', 'lead');
	theo = await person('Theo', 'technician');
});

describe('the symptom catalogue page', () => {
	it('lets a technician read the catalogue but refuses every change with 403', async () => {
		const page = (await load(event(theo))) as Page;
		expect(page.canEdit).toBe(false);
		expect(page.groups.map((g) => g.group)).toContain('Power and start');
		expect(page.audit).toEqual([]);
		expect(
			await status(() => add(theo, { code: 'speaker-rattle', label: 'Rattle', group: 'Sound and voice' }))
		).toBe(403);
		expect(await status(() => update(theo, { code: 'vibration', label: 'Buzz', group: 'Care' }))).toBe(403);
		expect((await catalogue.catalogue()).map((s) => s.code)).not.toContain('speaker-rattle');
		expect((await catalogue.labels()).get('vibration')).toBe('No vibration');
	});

	it('lets a senior add, rename, regroup and retire, each with an audit entry', async () => {
		expect(
			await add(sena, { code: 'Speaker-Rattle', label: 'Loudspeaker rattles', group: 'Sound and voice' })
		).toMatchObject({
			form: {
				valid: true,
				data: { code: 'speaker-rattle' },
				message: expect.stringContaining('Sound and voice')
			}
		});
		const added = (await catalogue.catalogue()).find((s) => s.code === 'speaker-rattle')!;
		expect(added).toMatchObject({ label: 'Loudspeaker rattles', group: 'Sound and voice', retired: false });
		// At the end of its group: after the seeded sound symptoms, before the next group.
		const sound = (await catalogue.catalogue()).filter((s) => s.group === 'Sound and voice');
		expect(sound.at(-1)?.code).toBe('speaker-rattle');

		await update(lena, {
			code: 'speaker-rattle',
			label: 'Loudspeaker buzzes or rattles',
			group: 'Buttons and body'
		});
		expect((await catalogue.catalogue()).find((s) => s.code === 'speaker-rattle')).toMatchObject({
			label: 'Loudspeaker buzzes or rattles',
			group: 'Buttons and body'
		});
		const retired = await update(sena, {
			code: 'speaker-rattle',
			label: 'Loudspeaker buzzes or rattles',
			group: 'Buttons and body',
			retired: 'on'
		});
		expect(retired).toMatchObject({
			form: { id: 'symptom-speaker-rattle', message: expect.stringContaining('retired') }
		});
		expect(await auditOf('speaker-rattle')).toEqual(['symptom.add', 'symptom.update', 'symptom.retire']);
		const [renamed] = await (
			await getDb()
		)
			.select()
			.from(auditLog)
			.where(eq(auditLog.action, 'symptom.update'));
		expect(renamed.details).toEqual({
			from: { label: 'Loudspeaker rattles', group: 'Sound and voice', sortOrder: added.sortOrder },
			to: { label: 'Loudspeaker buzzes or rattles', group: 'Buttons and body', sortOrder: expect.any(Number) }
		});
		const page = (await load(event(sena))) as Page;
		expect(page.audit[0].text).toBe('retired speaker-rattle');
	});

	it('refuses bad input with field messages and the values back, and a duplicate code with 409', async () => {
		type Refused = {
			status: number;
			data: {
				form: { data: Record<string, string>; errors: Record<string, string[]> & { _errors?: string[] } };
			};
		};
		const bad = (await add(sena, { code: 'no power!', label: 'x', group: 'Care' })) as Refused;
		expect(bad.status).toBe(400);
		expect(Object.keys(bad.data.form.errors).sort()).toEqual(['code', 'label']);
		expect(bad.data.form.data.code).toBe('no power!');
		const dup = (await add(sena, { code: 'no-power', label: 'No power at all', group: 'Care' })) as Refused;
		expect(dup.status).toBe(409);
		expect(dup.data.form.errors.code?.[0]).toMatch(/already has/);
		expect(dup.data.form.data.label).toBe('No power at all');
		const badEdit = (await update(sena, { code: 'vibration', label: 'x', group: 'Care' })) as Refused;
		expect(badEdit.status).toBe(400);
		expect(badEdit.data.form.errors.label?.[0]).toMatch(/few words/);
		expect(badEdit.data.form.data).toMatchObject({ code: 'vibration', label: 'x', group: 'Care' });
		const missing = (await update(sena, {
			code: 'no-such-code',
			label: 'Nothing',
			group: 'Care'
		})) as Refused;
		expect(missing.data.form.errors._errors?.[0]).toBeTruthy();
		expect(missing.status).toBe(404);
	});
});

describe('intake and the library with the catalogue', () => {
	// Invented IMEI ("00" test reporting body, from memory), check digit computed.
	const body = '00550000000007';
	const job = (symptoms: string[]) => ({
		method: 'POST',
		headers: { 'content-type': 'application/json' },
		body: JSON.stringify({
			customerName: 'Perrin Oakes',
			customerPhone: '+00 555 0177',
			maker: 'Halvard',
			model: 'Skerry S',
			imei: `${body}${imeiCheckDigit(body)}`,
			symptoms,
			liquid: 'salt',
			submerged: false,
			passcodeStatus: 'given'
		})
	});

	it('records a symptom no flow covers, refuses a retired or unknown one, and does not offer retired ones', async () => {
		await add(sena, { code: 'speaker-hiss', label: 'Loudspeaker hisses', group: 'Sound and voice' });
		const res = await createJob(event(theo, '/api/jobs', job(['speaker-hiss', 'no-sound'])));
		expect(res.status).toBe(201);
		const refused = await createJob(event(theo, '/api/jobs', job(['speaker-rattle'])));
		expect(refused.status).toBe(400);
		expect(JSON.stringify(await refused.json())).toContain('symptom catalogue');
		expect((await createJob(event(theo, '/api/jobs', job(['made-up'])))).status).toBe(400);

		const intake = (await intakeLoad(event(theo, '/jobs/new'))) as {
			symptomGroups: { group: string; symptoms: { code: string }[] }[];
		};
		const offered = intake.symptomGroups.flatMap((g) => g.symptoms.map((s) => s.code));
		expect(offered).toContain('speaker-hiss');
		expect(offered).not.toContain('speaker-rattle');
		expect(intake.symptomGroups[0].group).toBe('Power and start');
	});

	it('lists symptoms without a flow in the library with how many jobs came in with them', async () => {
		const page = (await libraryLoad(event(theo, '/flows'))) as {
			withoutFlow: { code: string; jobs: number }[];
		};
		expect(page.withoutFlow[0]).toEqual({
			code: 'speaker-hiss',
			label: 'Loudspeaker hisses',
			group: 'Sound and voice',
			jobs: 1
		});
		const codes = page.withoutFlow.map((s) => s.code);
		expect(codes).toContain('nfc-fault'); // seeded, and no shipped flow is tagged with it
		expect(codes).not.toContain('no-sound');
		expect(codes).not.toContain('speaker-rattle');
	});
});
