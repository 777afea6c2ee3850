// Over 300 lines on purpose: one flat job shape shared by the intake form, the API and the list query.
/**
 * Job intake and job changes. One flat shape serves the intake form (superforms) and the JSON API,
 * so the browser, the form action and POST /api/jobs refuse the same things with the same words.
 * Isomorphic: no server imports.
 */
import { z } from 'zod';
import { text } from '$lib/schemas/text';
import {
	assessExposure,
	liquidKinds,
	liquidTemperatures,
	parseIpCode,
	waterMotions,
	type DeviceRating,
	type Exposure
} from '$lib/domain/exposure';
import { isValidImei, normaliseImei } from '$lib/domain/identifiers';
import { jobStatuses } from '$lib/domain/jobStatus';
import { endOfLocalDay, localDayAfter } from '$lib/domain/queue';

export const passcodeStatuses = ['given', 'withheld', 'not-needed'] as const;
export type PasscodeStatus = (typeof passcodeStatuses)[number];

export const passcodeLabels: Record<PasscodeStatus, string> = {
	given: 'Given by the customer',
	withheld: 'Withheld by the customer',
	'not-needed': 'Not needed'
};

export const liquidLabels: Record<(typeof liquidKinds)[number], string> = {
	fresh: 'Fresh water',
	salt: 'Salt water',
	chlorinated: 'Chlorinated (pool)',
	sugary: 'Sugary drink',
	other: 'Other liquid',
	unknown: 'Unknown'
};

/** Short answers for the intake's test-condition questions (IEC 60529: within 5 K, at rest). */
export const temperatureLabels: Record<(typeof liquidTemperatures)[number], string> = {
	room: 'Cold or room',
	warm: 'Warm',
	hot: 'Hot'
};
export const temperatureHints: Record<(typeof liquidTemperatures)[number], string> = {
	room: 'tap, rain, a glass of water',
	warm: 'bath, hot tub, washing machine',
	hot: 'hot drink, kettle, dishwasher'
};
export const motionLabels: Record<(typeof waterMotions)[number], string> = {
	still: 'Still',
	moving: 'Moving',
	jet: 'Jet or running tap'
};
export const motionHints: Record<(typeof waterMotions)[number], string> = {
	still: 'dropped in, spilled',
	moving: 'swimming, waves, washing machine',
	jet: 'under a tap, shower or hose'
};

/** "no-power" → "No power": symptom tags are kebab-case ids from the flows. */
export function symptomLabel(tag: string) {
	const words = tag.replace(/-/g, ' ');
	return words.charAt(0).toUpperCase() + words.slice(1);
}

/** The job number people say and write: TM-000123. */
export function formatJobNumber(n: number) {
	return `TM-${String(n).padStart(6, '0')}`;
}

/** Serial numbers are read off trays and labels: compare them without spaces or dashes, upper case. */
export function normaliseSerial(value: string) {
	return value.replace(/[\s-]/g, '').toUpperCase();
}

const PHONE = /^\+?[0-9 ()./-]{6,30}$/;
/** A date-time with a zone (API) or a browser's datetime-local value (the form sends its offset too). */
const DATE_TIME = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2}(\.\d{1,3})?)?(Z|[+-]\d{2}:\d{2})?$/;

const optionalNumber = (max: number, what: string) =>
	z
		.number({ error: `Enter ${what} as a number.` })
		.nonnegative(`${what[0].toUpperCase()}${what.slice(1)} cannot be negative.`)
		.max(max, `That is more than ${max}; check the ${what}.`)
		.optional();

const LIQUID_MESSAGE = 'Choose the liquid (or “Unknown”).';
const PASSCODE_MESSAGE = 'Choose whether the customer gave the passcode, withheld it, or it is not needed.';

const intakeShape = {
	customerName: text('The customer’s name')
		.trim()
		.min(2, 'Enter the customer’s name (at least 2 characters).')
		.max(120, 'Use at most 120 characters.'),
	customerEmail: text('The e-mail address')
		.trim()
		.max(200)
		.refine(
			(v) => v === '' || z.email().safeParse(v).success,
			'Enter a valid e-mail address, or leave it empty.'
		)
		.default(''),
	customerPhone: text('The phone number')
		.trim()
		.refine(
			(v) => v === '' || PHONE.test(v),
			'Enter a phone number with digits (spaces, +, - and brackets allowed).'
		)
		.default(''),
	maker: text('The maker').trim().min(1, 'Enter the maker.').max(80, 'Use at most 80 characters.'),
	model: text('The model').trim().min(1, 'Enter the model.').max(120, 'Use at most 120 characters.'),
	imei: text('The IMEI').trim().max(40, 'An IMEI has 15 digits.').default(''),
	serial: text('The serial number').trim().max(40, 'Use at most 40 characters.').default(''),
	symptoms: z.array(text('A symptom').max(60)).max(20, 'Choose at most 20 symptoms.').default([]),
	// Nullable, not defaulted: a form that never touched these must fail, not take the first choice.
	liquid: z.enum(liquidKinds, { error: LIQUID_MESSAGE }).nullable(),
	/** '' when the customer does not know when it happened. */
	exposedAt: text('The time of exposure')
		.trim()
		.refine(
			(v) => v === '' || (DATE_TIME.test(v) && !Number.isNaN(Date.parse(v))),
			'Enter a date and time, or leave it empty.'
		)
		.default(''),
	/** The browser's Date#getTimezoneOffset() for a zone-less exposedAt; 0 (UTC) when absent. */
	tzOffsetMin: z.number().int().min(-840).max(840).default(0),
	submerged: z.boolean().default(false),
	// Defaults are the commonest answers, so a quick intake taps nothing; the verdict names them.
	liquidTemperature: z.enum(liquidTemperatures, { error: 'Choose how warm the liquid was.' }).default('room'),
	waterMotion: z
		.enum(waterMotions, { error: 'Choose whether the water was still or moving.' })
		.default('still'),
	/** Only asked for fresh water: any other liquid is already outside the test conditions. */
	soapy: z.boolean().default(false),
	depthM: optionalNumber(1000, 'depth in metres'),
	minutes: optionalNumber(100_000, 'time in minutes'),
	ratingCode: text('The rating code').trim().max(40).default(''),
	declaredDepthM: optionalNumber(1000, 'declared depth'),
	declaredMinutes: optionalNumber(100_000, 'declared minutes'),
	dataFirst: z.boolean().default(false),
	passcodeStatus: z.enum(passcodeStatuses, { error: PASSCODE_MESSAGE }).nullable(),
	consentToOpen: z.boolean().default(false),
	notes: text('Notes').trim().max(4000, 'Keep notes under 4000 characters.').default(''),
	/** The day promised to the customer (YYYY-MM-DD, in the browser's zone); '' takes the shop's turnaround. */
	promisedDate: z
		.string()
		.trim()
		.refine(
			(v) => v === '' || (/^\d{4}-\d{2}-\d{2}$/.test(v) && !Number.isNaN(Date.parse(`${v}T00:00:00Z`))),
			'Enter the promised date as a date, or leave it empty for the usual turnaround.'
		)
		.default('')
};

type IntakeShape = z.infer<z.ZodObject<typeof intakeShape>>;

/** The rating and exposure as the domain module wants them. */
export function ratingOf(
	v: Pick<IntakeShape, 'ratingCode' | 'declaredDepthM' | 'declaredMinutes'>
): DeviceRating {
	const ip = parseIpCode(v.ratingCode);
	const code = ip === null ? null : ip === 'invalid' ? v.ratingCode : ip.code;
	// Declared figures only mean something for IP68; drop stale ones left from an earlier entry.
	if (ip === null || ip === 'invalid' || ip.immersion !== 8) return { code };
	return {
		code,
		declaredDepthM: v.declaredDepthM || undefined,
		declaredMinutes: v.declaredMinutes || undefined
	};
}

export function exposureOf(
	v: Pick<
		IntakeShape,
		'liquid' | 'submerged' | 'depthM' | 'minutes' | 'liquidTemperature' | 'waterMotion' | 'soapy'
	>
): Exposure {
	const liquid = v.liquid ?? 'unknown';
	const conditions = {
		temperature: v.liquidTemperature,
		motion: v.waterMotion,
		// A soap tick left over from an earlier "fresh water" choice must not follow another liquid.
		soapy: liquid === 'fresh' ? v.soapy : false
	};
	return v.submerged
		? { liquid, submerged: true, depthM: v.depthM, minutes: v.minutes, ...conditions }
		: { liquid, submerged: false, ...conditions };
}

/** The exposure time as an instant, or null when unknown. */
export function exposedAtOf(v: Pick<IntakeShape, 'exposedAt' | 'tzOffsetMin'>): Date | null {
	if (!v.exposedAt) return null;
	if (/(Z|[+-]\d{2}:\d{2})$/.test(v.exposedAt)) return new Date(v.exposedAt);
	// A datetime-local value is wall-clock time in the browser's zone; getTimezoneOffset is UTC − local.
	return new Date(Date.parse(`${v.exposedAt}Z`) + v.tzOffsetMin * 60_000);
}

/** The promised instant: the end of the chosen day, or of today plus the shop's turnaround. */
export function promisedAtOf(
	v: Pick<IntakeShape, 'promisedDate' | 'tzOffsetMin'>,
	turnaroundDays: number,
	now = new Date()
): Date {
	const day = v.promisedDate || localDayAfter(now, turnaroundDays, v.tzOffsetMin);
	return endOfLocalDay(day, v.tzOffsetMin);
}

/**
 * The intake schema. `symptomVocabulary` is the codes of the symptom catalogue that intake offers
 * (not retired); pass it on the server so anything else is refused. Without it any kebab-case tag passes (client preview).
 */
export function makeJobIntake(symptomVocabulary?: readonly string[]) {
	const known = symptomVocabulary ? new Set(symptomVocabulary) : null;
	return z.object(intakeShape).superRefine((v, ctx) => {
		if (v.liquid === null) ctx.addIssue({ code: 'custom', path: ['liquid'], message: LIQUID_MESSAGE });
		if (v.passcodeStatus === null)
			ctx.addIssue({ code: 'custom', path: ['passcodeStatus'], message: PASSCODE_MESSAGE });
		if (!v.customerEmail && !v.customerPhone) {
			const message = 'Give an e-mail address or a phone number (or both).';
			ctx.addIssue({ code: 'custom', path: ['customerEmail'], message });
			ctx.addIssue({ code: 'custom', path: ['customerPhone'], message });
		}
		if (!v.imei && !v.serial) {
			ctx.addIssue({
				code: 'custom',
				path: ['imei'],
				message: 'Enter the IMEI, or the serial number if the IMEI cannot be read.'
			});
		}
		if (v.imei) {
			const digits = normaliseImei(v.imei);
			if (!/^\d{15}$/.test(digits)) {
				const message = /^\d+$/.test(digits)
					? `An IMEI has exactly 15 digits; this has ${digits.length}.`
					: 'An IMEI has only digits (spaces and dashes are fine).';
				ctx.addIssue({ code: 'custom', path: ['imei'], message });
			} else if (!isValidImei(digits)) {
				ctx.addIssue({
					code: 'custom',
					path: ['imei'],
					message:
						'The check digit (the last digit) does not match: a digit was probably misread. Read the IMEI again.'
				});
			}
		}
		for (const tag of v.symptoms) {
			if (!/^[a-z0-9]+(-[a-z0-9]+)*$/.test(tag) || (known && !known.has(tag))) {
				ctx.addIssue({
					code: 'custom',
					path: ['symptoms'],
					message: `“${tag}” is not in the symptom catalogue (or it was retired).`
				});
			}
		}
		if (v.submerged) {
			if (v.depthM === undefined)
				ctx.addIssue({
					code: 'custom',
					path: ['depthM'],
					message: 'Submerged: enter about how deep (metres; a best guess is fine).'
				});
			if (v.minutes === undefined)
				ctx.addIssue({
					code: 'custom',
					path: ['minutes'],
					message: 'Submerged: enter about how long (minutes; a best guess is fine).'
				});
		}
		const ip = parseIpCode(v.ratingCode);
		if (ip === 'invalid') {
			ctx.addIssue({
				code: 'custom',
				path: ['ratingCode'],
				message: 'Not an IP code: write it like IP67, IPX7 or IP65/IP68, or leave it empty for none.'
			});
		} else if (ip?.immersion === 8 && (v.declaredDepthM || v.declaredMinutes)) {
			const result = assessExposure(ratingOf(v), { liquid: 'fresh', submerged: false });
			if (result.status === 'invalid-rating') {
				ctx.addIssue({ code: 'custom', path: ['declaredDepthM'], message: result.explanation });
			}
		}
		if (v.promisedDate && v.promisedDate < localDayAfter(new Date(), 0, v.tzOffsetMin)) {
			ctx.addIssue({
				code: 'custom',
				path: ['promisedDate'],
				message: 'That day has passed; promise today or a later day.'
			});
		}
		const at = exposedAtOf(v);
		if (at && at.getTime() > Date.now() + 5 * 60_000) {
			ctx.addIssue({
				code: 'custom',
				path: ['exposedAt'],
				message: 'That is in the future; enter when it happened.'
			});
		}
	});
}

export const jobIntake = makeJobIntake();
export type JobIntake = z.infer<typeof jobIntake>;

export const sortColumns = [
	'number',
	'customer',
	'model',
	'status',
	'createdAt',
	'updatedAt',
	'urgency',
	'promisedAt'
] as const;
export const urgencyLevels = ['low', 'elevated', 'high', 'critical'] as const;
export type JobSortColumn = (typeof sortColumns)[number];

/** GET /api/jobs and the /jobs page URL: every part optional, so a bare URL lists the newest jobs. */
export const jobListQuery = z.object({
	q: text('The search').trim().max(100).default(''),
	status: z.enum(jobStatuses).optional().catch(undefined),
	technician: z
		.union([z.uuid(), z.literal('none')])
		.optional()
		.catch(undefined),
	/** At least this urgency of cleaning, as of now (open jobs only). */
	urgency: z.enum(urgencyLevels).optional().catch(undefined),
	/** '1': only open jobs past their promised date. */
	overdue: z.literal('1').optional().catch(undefined),
	sort: z.enum(sortColumns).default('createdAt').catch('createdAt'),
	dir: z.enum(['asc', 'desc']).default('desc').catch('desc'),
	page: z.coerce.number().int().min(1).max(100_000).default(1).catch(1),
	size: z.coerce.number().int().min(5).max(100).default(20).catch(20)
});
export type JobListQuery = z.infer<typeof jobListQuery>;

export function listQueryFrom(params: URLSearchParams): JobListQuery {
	return jobListQuery.parse(Object.fromEntries(params));
}

/** The URL search string for a list query, leaving out defaults so links stay short. */
export function listQueryString(query: Partial<JobListQuery>): string {
	const defaults = jobListQuery.parse({});
	const params = new URLSearchParams();
	for (const key of [
		'q',
		'status',
		'technician',
		'urgency',
		'overdue',
		'sort',
		'dir',
		'page',
		'size'
	] as const) {
		const value = query[key];
		if (value !== undefined && value !== '' && value !== defaults[key]) params.set(key, String(value));
	}
	const s = params.toString();
	return s ? `?${s}` : '';
}

/** PATCH /api/jobs/:id — one change at a time. */
export const jobPatch = z.union([
	z.object({ status: z.enum(jobStatuses), note: text('The note').trim().max(1000).default('') }).strict(),
	z.object({ technicianId: z.uuid().nullable() }).strict(),
	z.object({ consentToOpen: z.literal(true) }).strict()
]);
export type JobPatch = z.infer<typeof jobPatch>;

/** Today's "Take it" row form: one per unassigned job, id `take-<job id>`. */
export const takeJob = z.object({ jobId: z.uuid({ error: 'Choose a job to take.' }) });
