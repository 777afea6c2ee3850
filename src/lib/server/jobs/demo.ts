import { imeiCheckDigit } from '$lib/domain/identifiers';
import * as staff from '$lib/server/staff/queries';
import { demoStaff } from '$lib/server/demo/seed';
import * as jobs from './queries';
import type { JobIntake } from '$lib/schemas/job';

/**
 * A few invented jobs for the demo shop. Customers, devices and numbers are made up. The IMEI
 * bodies start with "00", the reporting body kept for test IMEIs (from memory), so no demo number
 * can belong to a real phone; their check digits are computed, not typed.
 */
const imei = (body14: string) => `${body14}${imeiCheckDigit(body14)}`;

const base = {
	serial: '',
	tzOffsetMin: 0,
	ratingCode: '',
	declaredDepthM: undefined,
	declaredMinutes: undefined,
	depthM: undefined,
	minutes: undefined,
	liquidTemperature: 'room',
	waterMotion: 'still',
	soapy: false,
	customerEmail: '',
	customerPhone: '',
	dataFirst: false,
	notes: '',
	promisedDate: ''
} satisfies Partial<JobIntake>;

const hoursAgo = (h: number) => new Date(Date.now() - h * 3_600_000).toISOString();

export function demoJobs(): JobIntake[] {
	return [
		{
			...base,
			customerName: 'Marit Ombrevik-Hale',
			customerEmail: 'marit@example.test',
			maker: 'Corvana',
			model: 'Tern 6 Pro',
			imei: imei('00440101234567'),
			symptoms: ['restart-loop'],
			liquid: 'salt',
			exposedAt: hoursAgo(20),
			submerged: true,
			depthM: 1.5,
			minutes: 10,
			ratingCode: 'IP68',
			declaredDepthM: 6,
			declaredMinutes: 30,
			dataFirst: true,
			passcodeStatus: 'given',
			consentToOpen: true,
			notes: 'Dropped off a jetty; rinsed in tap water by the customer afterwards.'
		},
		{
			...base,
			customerName: 'Jonah Pettersen',
			customerPhone: '+44 20 7946 0018',
			maker: 'Halvard',
			model: 'Skerry S',
			imei: imei('00440207654321'),
			symptoms: ['no-power', 'no-boot'],
			liquid: 'sugary',
			exposedAt: hoursAgo(3),
			submerged: false,
			ratingCode: 'IP54',
			passcodeStatus: 'withheld',
			consentToOpen: true,
			notes: 'Cola spilled over it on a desk; switched off straight away.'
		},
		{
			...base,
			customerName: 'Aurelie Brandt',
			customerEmail: 'aurelie.brandt@example.test',
			customerPhone: '0161 496 0732',
			maker: 'Nomi Devices',
			model: 'Brook 3',
			imei: '',
			serial: 'NB3K7Q2X9',
			symptoms: ['not-charging'],
			liquid: 'fresh',
			exposedAt: '',
			submerged: true,
			depthM: 0.3,
			minutes: 2,
			ratingCode: 'IP67',
			passcodeStatus: 'not-needed',
			consentToOpen: false,
			notes: 'Fell into a sink. IMEI label unreadable; serial from the SIM tray.'
		},
		{
			...base,
			customerName: 'Teodor Wrenfield',
			customerEmail: 'teo.wrenfield@example.test',
			maker: 'Corvana',
			model: 'Tern 5',
			imei: imei('00440305550123'),
			symptoms: ['no-sound', 'microphone-fault'],
			liquid: 'chlorinated',
			exposedAt: hoursAgo(50),
			submerged: true,
			depthM: 2,
			minutes: 5,
			waterMotion: 'moving',
			ratingCode: '',
			passcodeStatus: 'given',
			consentToOpen: true,
			notes: 'In a trouser pocket while swimming laps.'
		}
	];
}

/** Seeds the demo jobs once: only in demo mode, only when there are no jobs at all. */
export async function seedDemoJobs(): Promise<number> {
	if ((await jobs.count()) > 0) return 0;
	const lead = await staff.findByEmail(demoStaff[0].email);
	const tech = await staff.findByEmail(demoStaff[2].email);
	const list = demoJobs();
	for (const [i, input] of list.entries()) {
		const job = await jobs.create(lead?.id ?? null, input);
		// Spread the demo over the workflow so the list shows more than one status.
		if (i === 0 && tech) {
			await jobs.assignTechnician(job.id, tech.id, lead?.id ?? null);
			await jobs.transition(job.id, 'diagnosing', tech.id, 'Opened; corrosion near the charge port');
		}
		if (i === 3 && tech) await jobs.assignTechnician(job.id, tech.id, lead?.id ?? null);
	}
	console.log(`[demo] seeded ${list.length} jobs`);
	return list.length;
}
