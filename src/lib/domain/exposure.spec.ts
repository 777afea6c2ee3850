// Over 300 lines on purpose: a spec: the exposure rules against the IP test conditions, case by case.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
	assessExposure,
	exposureSchema,
	parseIpCode,
	ratingSchema,
	urgencyHint,
	type DeviceRating,
	type Exposure,
	type LiquidKind
} from './exposure';

const fresh = (depthM: number, minutes: number): Exposure => ({
	liquid: 'fresh',
	submerged: true,
	depthM,
	minutes
});
const ip68 = (declaredDepthM: number, declaredMinutes: number): DeviceRating => ({
	code: 'IP68',
	declaredDepthM,
	declaredMinutes
});

describe('assessExposure — every case of the table in trade-reference §1 (IEC 60529 via trade-reference §1, cases computed)', () => {
	it.each<[string, DeviceRating, Exposure, string, string[]]>([
		['IP68 6 m/30 min, fresh 1.5 m 10 min', ip68(6, 30), fresh(1.5, 10), 'within', []],
		['IP68 6 m/30 min, fresh 2 m 45 min', ip68(6, 30), fresh(2, 45), 'exceeded', ['duration']],
		['IP68 1.5 m/30 min, fresh 2 m 5 min', ip68(1.5, 30), fresh(2, 5), 'exceeded', ['depth']],
		['IP67, fresh 1.0 m 30 min (boundary, inclusive)', { code: 'IP67' }, fresh(1.0, 30), 'within', []],
		['IP67, fresh 1.01 m 1 min', { code: 'IP67' }, fresh(1.01, 1), 'exceeded', ['depth']],
		['IP67, fresh 0.3 m 31 min', { code: 'IP67' }, fresh(0.3, 31), 'exceeded', ['duration']],
		[
			'IP67, sea 0.5 m 5 min',
			{ code: 'IP67' },
			{ liquid: 'salt', submerged: true, depthM: 0.5, minutes: 5 },
			'outside-test-conditions',
			['liquid']
		],
		['IP54, fresh 0.1 m 1 min', { code: 'IP54' }, fresh(0.1, 1), 'exceeded', ['no-immersion-rating']],
		[
			'IP68 without declared depth/time, fresh 0.5 m 5 min',
			{ code: 'IP68' },
			fresh(0.5, 5),
			'undetermined',
			[]
		],
		['IP68 0.5 m/30 min, fresh 0.2 m 5 min', ip68(0.5, 30), fresh(0.2, 5), 'invalid-rating', []]
	])('%s → %s', (_label, rating, exposure, status, reasons) => {
		const result = assessExposure(rating, exposure);
		expect(result.status).toBe(status);
		expect(result.reasons).toEqual(reasons);
		expect(result.explanation.length).toBeGreaterThan(20);
	});
});

describe('assessExposure — edge cases (our design choices, IEC 60529 via trade-reference §1)', () => {
	it('IP67 limits are the standard 1 m / 30 min whatever the maker declares', () => {
		const r = assessExposure({ code: 'IP67', declaredDepthM: 5, declaredMinutes: 60 }, fresh(2, 5));
		expect(r).toMatchObject({ status: 'exceeded', reasons: ['depth'] });
	});

	it('IPX7 reads like IP67; lowercase and spaces are accepted', () => {
		expect(assessExposure({ code: 'IPX7' }, fresh(1, 30)).status).toBe('within');
		expect(assessExposure({ code: ' ip 67 ' }, fresh(1.01, 30)).reasons).toEqual(['depth']);
	});

	it('IP68 declared limits are inclusive at both edges', () => {
		expect(assessExposure(ip68(6, 30), fresh(6, 30)).status).toBe('within');
		expect(assessExposure(ip68(6, 30), fresh(6.001, 30)).reasons).toEqual(['depth']);
	});

	it('IP68 is valid when harsher in only one of depth or time ("and/or")', () => {
		expect(assessExposure(ip68(1, 31), fresh(0.5, 31)).status).toBe('within');
		expect(assessExposure(ip68(2, 10), fresh(1.5, 10)).status).toBe('within');
		expect(assessExposure(ip68(1, 30), fresh(0.5, 5)).status).toBe('invalid-rating');
	});

	it('IP68 with only one of depth or minutes declared is undetermined', () => {
		expect(assessExposure({ code: 'IP68', declaredDepthM: 4 }, fresh(0.5, 5)).status).toBe('undetermined');
	});

	it('IP68 without a declaration in salt water is still outside the test conditions', () => {
		const r = assessExposure({ code: 'IP68' }, { liquid: 'salt', submerged: true, depthM: 0.5, minutes: 5 });
		expect(r).toMatchObject({ status: 'outside-test-conditions', reasons: ['liquid'] });
		expect(r.explanation).toMatch(/declared depth and minutes/);
	});

	it('both limits broken gives both reasons; non-fresh adds the liquid reason but stays exceeded', () => {
		expect(assessExposure({ code: 'IP67' }, fresh(3, 60)).reasons).toEqual(['depth', 'duration']);
		const r = assessExposure({ code: 'IP67' }, { liquid: 'sugary', submerged: true, depthM: 2, minutes: 5 });
		expect(r).toMatchObject({ status: 'exceeded', reasons: ['depth', 'liquid'] });
	});

	it.each<LiquidKind>(['salt', 'chlorinated', 'sugary', 'other', 'unknown'])(
		'%s liquid within the limits is outside the test conditions',
		(liquid) => {
			const r = assessExposure({ code: 'IP67' }, { liquid, submerged: true, depthM: 0.2, minutes: 1 });
			expect(r).toMatchObject({ status: 'outside-test-conditions', reasons: ['liquid'] });
			expect(r.explanation).toMatch(/not fresh water/);
			expect(r.explanation).toMatch(/clause from memory/);
		}
	);

	it.each<[string | null]>([[null], ['none'], [''], ['IPXX']])(
		'no rating (%j) and submerged → exceeded: no-immersion-rating',
		(code) => {
			expect(assessExposure({ code }, fresh(0.1, 1))).toMatchObject({
				status: 'exceeded',
				reasons: ['no-immersion-rating']
			});
		}
	);

	it('no immersion rating in salt water lists both reasons', () => {
		const r = assessExposure({ code: 'IP54' }, { liquid: 'salt', submerged: true });
		expect(r.reasons).toEqual(['no-immersion-rating', 'liquid']);
	});

	it('unknown depth or time: undetermined, unless a known value already breaks a limit', () => {
		expect(assessExposure({ code: 'IP67' }, { liquid: 'fresh', submerged: true, minutes: 5 })).toMatchObject({
			status: 'undetermined'
		});
		expect(assessExposure({ code: 'IP67' }, { liquid: 'fresh', submerged: true }).explanation).toMatch(
			/depth and time/
		);
		expect(assessExposure({ code: 'IP67' }, { liquid: 'fresh', submerged: true, depthM: 2 })).toMatchObject({
			status: 'exceeded',
			reasons: ['depth']
		});
	});

	it('a code that is not an IP code is an invalid rating', () => {
		for (const code of ['IP7', 'IP77', 'IP6', 'XP67', 'IP67/IP9', 'waterproof']) {
			expect(assessExposure({ code }, fresh(0.1, 1)).status).toBe('invalid-rating');
		}
	});

	it('a dual code IP65/IP68 uses the immersion digit', () => {
		expect(
			assessExposure({ code: 'IP65/IP68', declaredDepthM: 2, declaredMinutes: 30 }, fresh(2, 30)).status
		).toBe('within');
	});

	it('negative or non-finite exposure numbers are a programming error (RangeError)', () => {
		expect(() => assessExposure({ code: 'IP67' }, fresh(-1, 5))).toThrow(RangeError);
		expect(() => assessExposure({ code: 'IP67' }, fresh(1, Number.NaN))).toThrow(RangeError);
	});

	it('zero or negative IP68 declarations are an invalid rating', () => {
		expect(assessExposure(ip68(0, 60), fresh(0.1, 1)).status).toBe('invalid-rating');
	});
});

describe('assessExposure — test conditions of the immersion tests (IEC 60529 digits 7/8: fresh water within 5 K of the specimen, specimen at rest; published, via trade-reference §9; clause from memory)', () => {
	const still = (extra: Partial<Exposure> = {}): Exposure => ({
		...fresh(0.5, 5),
		temperature: 'room',
		motion: 'still',
		soapy: false,
		...extra
	});

	it('still fresh water at room temperature within the limits is within, and says which conditions it assumed', () => {
		const r = assessExposure({ code: 'IP67' }, still());
		expect(r.status).toBe('within');
		expect(r.explanation).toMatch(/in still fresh water near the phone’s temperature/);
	});

	it.each<['warm' | 'hot']>([['warm'], ['hot']])(
		'%s water (more than 5 K warmer than the phone) is outside the test conditions, even well inside depth and time',
		(temperature) => {
			const r = assessExposure({ code: 'IP67' }, still({ temperature }));
			expect(r).toMatchObject({ status: 'outside-test-conditions', reasons: ['temperature'] });
			expect(r.explanation).toMatch(/more than 5 K warmer than the phone/);
			expect(r.explanation).toMatch(/within 5 K of the phone’s temperature/);
		}
	);

	it.each<['moving' | 'jet', RegExp]>([
		['moving', /water was moving/],
		['jet', /under a jet or running water/]
	])('%s water is outside the test conditions (the specimen is at rest in the test)', (motion, words) => {
		const r = assessExposure(ip68(6, 30), still({ motion }));
		expect(r).toMatchObject({ status: 'outside-test-conditions', reasons: ['motion'] });
		expect(r.explanation).toMatch(words);
		expect(r.explanation).toMatch(/with the phone at rest/);
	});

	it('soapy fresh water is outside the test conditions (the test liquid is fresh water)', () => {
		const r = assessExposure({ code: 'IP67' }, still({ soapy: true }));
		expect(r).toMatchObject({ status: 'outside-test-conditions', reasons: ['detergent'] });
		expect(r.explanation).toMatch(/soap or detergent/);
	});

	it('a washing machine — warm, soapy, moving — lists all three, and a broken limit still wins', () => {
		const machine = still({ temperature: 'warm', soapy: true, motion: 'moving' });
		expect(assessExposure({ code: 'IP67' }, machine).reasons).toEqual(['detergent', 'temperature', 'motion']);
		const deep = assessExposure({ code: 'IP67' }, { ...machine, minutes: 45 });
		expect(deep).toMatchObject({
			status: 'exceeded',
			reasons: ['duration', 'detergent', 'temperature', 'motion']
		});
	});

	it('soap is not counted twice for a liquid that is already not fresh water', () => {
		expect(assessExposure({ code: 'IP67' }, still({ liquid: 'salt', soapy: true })).reasons).toEqual([
			'liquid'
		]);
	});

	it('undeclared IP68 in hot water is outside the test conditions rather than undetermined', () => {
		const r = assessExposure({ code: 'IP68' }, still({ temperature: 'hot' }));
		expect(r).toMatchObject({ status: 'outside-test-conditions', reasons: ['temperature'] });
	});

	it('jobs taken in before these questions (no temperature, motion or soap) are judged as before', () => {
		expect(assessExposure({ code: 'IP67' }, fresh(0.5, 5)).status).toBe('within');
	});
});

describe('assessExposure — second digit 9 is a jet test, never an immersion rating (IEC 60529 amendment 2, 2013, via trade-reference §9)', () => {
	it.each<[string]>([['IP69'], ['IPX9'], ['IP69K'], ['ip 69']])(
		'%s submerged → exceeded: no immersion rating',
		(code) => {
			const r = assessExposure({ code }, fresh(0.1, 1));
			expect(r).toMatchObject({ status: 'exceeded', reasons: ['no-immersion-rating'] });
			expect(r.explanation).toMatch(/second digit 9 is a high-pressure, high-temperature jet test/);
		}
	);

	it('IP69 ignores a declared depth and time: there is no immersion test to declare them for', () => {
		const r = assessExposure({ code: 'IP69', declaredDepthM: 6, declaredMinutes: 30 }, fresh(0.1, 1));
		expect(r.status).toBe('exceeded');
	});

	it('a dual code IP68/IP69 is judged by its 8', () => {
		expect(
			assessExposure({ code: 'IP68/IP69', declaredDepthM: 6, declaredMinutes: 30 }, fresh(1, 5)).status
		).toBe('within');
	});

	it('IP69 and a splash: no splash test to compare with → undetermined', () => {
		const r = assessExposure({ code: 'IP69' }, { liquid: 'fresh', submerged: false });
		expect(r.status).toBe('undetermined');
		expect(r.explanation).toMatch(/digit 9 is a different test/);
	});
});

describe('assessExposure — not submerged (splash or spill)', () => {
	const splash = (liquid: LiquidKind = 'fresh'): Exposure => ({ liquid, submerged: false });

	it('says the immersion limits do not apply', () => {
		expect(assessExposure({ code: 'IP67' }, splash()).explanation).toMatch(/Not submerged/);
	});

	it('a splash test digit (4–6) in fresh water is within', () => {
		expect(assessExposure({ code: 'IP54' }, splash()).status).toBe('within');
		expect(
			assessExposure({ code: 'IP65/IP68', declaredDepthM: 2, declaredMinutes: 30 }, splash()).status
		).toBe('within');
	});

	it('7/8 alone do not imply splash/jet tests (IEC 60529 via trade-reference §1) → undetermined', () => {
		const r = assessExposure({ code: 'IP68', declaredDepthM: 6, declaredMinutes: 30 }, splash());
		expect(r.status).toBe('undetermined');
		expect(r.explanation).toMatch(/do(es)? not say digits 7 and 8 cover splashes/);
	});

	it('a running tap or jet needs a jet test (digits 5/6, IEC 60529 via trade-reference §1); a splash digit 4 is not enough', () => {
		const tap: Exposure = { liquid: 'fresh', submerged: false, motion: 'jet', temperature: 'room' };
		expect(assessExposure({ code: 'IP65/IP68', declaredDepthM: 2, declaredMinutes: 30 }, tap)).toMatchObject({
			status: 'within'
		});
		const r = assessExposure({ code: 'IP54' }, tap);
		expect(r.status).toBe('undetermined');
		expect(r.explanation).toMatch(/only a splash test/);
	});

	it('a splash of hot or soapy water is outside the test conditions', () => {
		expect(assessExposure({ code: 'IP54' }, { ...splash(), temperature: 'hot' })).toMatchObject({
			status: 'outside-test-conditions',
			reasons: ['temperature']
		});
		expect(assessExposure({ code: 'IP54' }, { ...splash(), soapy: true })).toMatchObject({
			status: 'outside-test-conditions',
			reasons: ['detergent']
		});
	});

	it('no rating → undetermined; non-fresh → outside the test conditions', () => {
		expect(assessExposure({ code: null }, splash()).status).toBe('undetermined');
		expect(assessExposure({ code: 'IP54' }, splash('sugary'))).toMatchObject({
			status: 'outside-test-conditions',
			reasons: ['liquid']
		});
	});
});

describe('assessExposure — properties (fast-check)', () => {
	it('IP67 in fresh water is within exactly when depth ≤ 1 m and minutes ≤ 30 (inclusive limits)', () => {
		fc.assert(
			fc.property(
				fc.double({ min: 0, max: 5, noNaN: true }),
				fc.double({ min: 0, max: 120, noNaN: true }),
				(depthM, minutes) => {
					const r = assessExposure({ code: 'IP67' }, fresh(depthM, minutes));
					expect(r.status === 'within').toBe(depthM <= 1 && minutes <= 30);
					expect(r.reasons.includes('depth')).toBe(depthM > 1);
					expect(r.reasons.includes('duration')).toBe(minutes > 30);
				}
			),
			{ numRuns: 1000 }
		);
	});
});

describe('assessExposure — conditions property (fast-check)', () => {
	it('an immersion outside the test conditions is never "within", whatever the rating and numbers', () => {
		fc.assert(
			fc.property(
				fc.constantFrom('IP67', 'IPX7', 'IP68', 'IP65/IP68', 'IP54', 'IP69', null),
				fc.double({ min: 0, max: 10, noNaN: true }),
				fc.double({ min: 0, max: 120, noNaN: true }),
				fc.constantFrom<Exposure['temperature']>('room', 'warm', 'hot'),
				fc.constantFrom<Exposure['motion']>('still', 'moving', 'jet'),
				fc.boolean(),
				(code, depthM, minutes, temperature, motion, soapy) => {
					const rating: DeviceRating = { code, declaredDepthM: 6, declaredMinutes: 30 };
					const r = assessExposure(rating, { ...fresh(depthM, minutes), temperature, motion, soapy });
					const outside = temperature !== 'room' || motion !== 'still' || soapy;
					if (outside) expect(r.status).not.toBe('within');
				}
			),
			{ numRuns: 500 }
		);
	});
});

describe('parseIpCode', () => {
	it('reads digits, X and dual codes', () => {
		expect(parseIpCode('IP67')).toEqual({ code: 'IP67', solids: 6, water: [7], immersion: 7 });
		expect(parseIpCode('ipx7')).toEqual({ code: 'IPX7', solids: null, water: [7], immersion: 7 });
		expect(parseIpCode('IP6X')).toEqual({ code: 'IP6X', solids: 6, water: [], immersion: null });
		expect(parseIpCode('IP65/IP68')).toMatchObject({ water: [5, 8], immersion: 8 });
		expect(parseIpCode('IP54')).toMatchObject({ solids: 5, water: [4], immersion: null });
		expect(parseIpCode('IP69K')).toMatchObject({ water: [9], immersion: null });
		expect(parseIpCode('IP54W')).toMatchObject({ water: [4] });
	});

	it('null for no rating, invalid for anything else', () => {
		expect(parseIpCode(null)).toBeNull();
		expect(parseIpCode(' None ')).toBeNull();
		expect(parseIpCode('IP7')).toBe('invalid');
		expect(parseIpCode('IP78')).toBe('invalid');
	});
});

describe('zod schemas for forms', () => {
	it('ratingSchema accepts a valid code and rejects text that is not an IP code', () => {
		expect(ratingSchema.safeParse({ code: 'IP68', declaredDepthM: 6, declaredMinutes: 30 }).success).toBe(
			true
		);
		expect(ratingSchema.safeParse({ code: null }).success).toBe(true);
		const bad = ratingSchema.safeParse({ code: 'waterproof' });
		expect(bad.success).toBe(false);
		expect(bad.error?.issues[0].message).toMatch(/Not an IP code/);
		expect(ratingSchema.safeParse({ code: 'IP68', declaredDepthM: -2, declaredMinutes: 30 }).success).toBe(
			false
		);
	});

	it('exposureSchema accepts known liquids and refuses negatives', () => {
		expect(exposureSchema.safeParse({ liquid: 'salt', submerged: true, depthM: 0.5 }).success).toBe(true);
		expect(exposureSchema.safeParse({ liquid: 'seawater', submerged: true }).success).toBe(false);
		expect(exposureSchema.safeParse({ liquid: 'fresh', submerged: true, minutes: -1 }).success).toBe(false);
		expect(
			exposureSchema.safeParse({
				liquid: 'fresh',
				submerged: true,
				temperature: 'hot',
				motion: 'jet',
				soapy: true
			}).success
		).toBe(true);
		expect(
			exposureSchema.safeParse({ liquid: 'fresh', submerged: true, temperature: 'boiling' }).success
		).toBe(false);
	});
});

describe('urgencyHint (common practice, no published source)', () => {
	it.each<[number | null, LiquidKind, string]>([
		[1, 'fresh', 'low'],
		[10, 'fresh', 'elevated'],
		[30, 'fresh', 'high'],
		[100, 'fresh', 'critical'],
		[1, 'chlorinated', 'elevated'],
		[1, 'salt', 'high'],
		[1, 'sugary', 'high'],
		[10, 'salt', 'critical'],
		[null, 'fresh', 'elevated'],
		[null, 'unknown', 'high']
	])('%j h, %s → %s', (hours, liquid, level) => {
		const hint = urgencyHint(hours, liquid);
		expect(hint.level).toBe(level);
		expect(hint.text).toMatch(/common practice, no published source/i);
	});

	it('never gets less urgent with time, and salt/sugary are never less urgent than fresh', () => {
		const rank = { low: 0, elevated: 1, high: 2, critical: 3 } as const;
		fc.assert(
			fc.property(
				fc.double({ min: 0, max: 500, noNaN: true }),
				fc.double({ min: 0, max: 500, noNaN: true }),
				(a, b) => {
					const [early, late] = a <= b ? [a, b] : [b, a];
					expect(rank[urgencyHint(late, 'fresh').level]).toBeGreaterThanOrEqual(
						rank[urgencyHint(early, 'fresh').level]
					);
					expect(rank[urgencyHint(a, 'salt').level]).toBeGreaterThanOrEqual(
						rank[urgencyHint(a, 'fresh').level]
					);
				}
			),
			{ numRuns: 500 }
		);
	});

	it('refuses negative or NaN hours', () => {
		expect(() => urgencyHint(-1, 'fresh')).toThrow(RangeError);
		expect(() => urgencyHint(Number.NaN, 'fresh')).toThrow(RangeError);
	});
});
