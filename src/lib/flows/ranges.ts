/**
 * Measure-step ranges: where a reading goes, and whether the ranges of a step cover the valid
 * readings exactly once. Ranges are half-open [min, max); the domain is closed [min, max].
 */
import type { FlowProblem } from './problems';
import type { Domain, MeasureStep, Range } from './schema';

export type RangeResult =
	| { ok: true; index: number; range: Range }
	| { ok: false; reason: 'not-a-number' | 'below-domain' | 'above-domain' | 'no-range'; message: string };

const lo = (r: { min?: number }) => r.min ?? -Infinity;
const hi = (r: { max?: number }) => r.max ?? Infinity;

/** Which range a reading falls in, or why it is refused. First matching range wins. */
export function rangeFor(step: Pick<MeasureStep, 'domain' | 'ranges' | 'unit'>, value: unknown): RangeResult {
	const unit = step.unit;
	if (typeof value !== 'number' || !Number.isFinite(value))
		return { ok: false, reason: 'not-a-number', message: 'Enter the reading as a number.' };
	const d = step.domain ?? {};
	if (value < lo(d))
		return {
			ok: false,
			reason: 'below-domain',
			message: `A reading below ${d.min} ${unit} is not possible here.`
		};
	if (value > hi(d))
		return {
			ok: false,
			reason: 'above-domain',
			message: `A reading above ${d.max} ${unit} is not possible here.`
		};
	const ranges = step.ranges ?? [];
	const index = ranges.findIndex((r) => value >= lo(r) && value < hi(r));
	if (index < 0)
		return { ok: false, reason: 'no-range', message: `No route is defined for ${value} ${unit}.` };
	return { ok: true, index, range: ranges[index] };
}

/** "0.01–0.5 A", "0.5 A and above", "below 0.01 A". */
export function describeRange(r: { min?: number; max?: number }, unit: string): string {
	if (r.min !== undefined && r.max !== undefined) return `${r.min}–${r.max} ${unit}`;
	if (r.min !== undefined) return `${r.min} ${unit} and above`;
	if (r.max !== undefined) return `below ${r.max} ${unit}`;
	return 'any reading';
}

function emptyDomain(d: Domain | undefined): boolean {
	return d !== undefined && lo(d) > hi(d);
}

/** range-empty, range-outside-domain, range-overlap and range-gap for one measure step. */
export function rangeProblems(stepId: string, step: MeasureStep): FlowProblem[] {
	const problems: FlowProblem[] = [];
	const { unit } = step;
	const ranges = step.ranges ?? [];
	const domain = step.domain ?? {};
	const at = (i: number) => ['steps', stepId, 'ranges', i];
	const name = (i: number) => `range ${i + 1} (${describeRange(ranges[i], unit)})`;

	if (emptyDomain(step.domain)) {
		problems.push({
			code: 'range-empty',
			step: stepId,
			path: ['steps', stepId, 'domain'],
			message: `The valid readings (domain) run from ${domain.min} down to ${domain.max} ${unit}: min must not be above max.`
		});
		return problems;
	}
	const [dlo, dhi] = [lo(domain), hi(domain)];
	if (ranges.length === 0) return problems; // reported as no-exits

	const usable: number[] = [];
	ranges.forEach((r, i) => {
		if (lo(r) >= hi(r)) {
			problems.push({
				code: 'range-empty',
				step: stepId,
				path: at(i),
				message: `${name(i)} holds no reading: its min must be below its max (min counts, max does not).`
			});
		} else if (hi(r) <= dlo || lo(r) > dhi) {
			problems.push({
				code: 'range-outside-domain',
				step: stepId,
				path: at(i),
				message: `${name(i)} lies wholly outside the valid readings (${describeDomain(domain, unit)}), so it can never be chosen.`
			});
		} else usable.push(i);
	});

	usable.sort((a, b) => lo(ranges[a]) - lo(ranges[b]) || hi(ranges[a]) - hi(ranges[b]));
	let covered = dlo; // readings in [dlo, covered) have a range
	let owner = -1; // the range that reaches furthest so far
	for (const i of usable) {
		const r = ranges[i];
		if (owner >= 0 && lo(r) < hi(ranges[owner])) {
			const overlap = { min: lo(r), max: Math.min(hi(r), hi(ranges[owner])) };
			problems.push({
				code: 'range-overlap',
				step: stepId,
				path: at(i),
				message: `${name(owner)} and ${name(i)} overlap (${describeBounds(overlap, unit)}): such a reading could go two ways. Make one range's max equal the next one's min.`
			});
		}
		if (lo(r) > covered) gap(covered, lo(r), false);
		if (owner < 0 || hi(r) > hi(ranges[owner])) owner = i;
		covered = Math.max(covered, hi(r));
	}
	// The domain's max is inclusive, so a reading of exactly dhi needs a range too.
	if (covered !== Infinity && covered <= dhi) gap(covered, dhi, true);
	return problems;

	function gap(from: number, to: number, inclusive: boolean) {
		const what =
			inclusive && from === to
				? `A reading of exactly ${from} ${unit} is valid but falls`
				: `Readings ${describeBounds({ min: from, max: to }, unit)}${inclusive && to !== Infinity ? ` (${to} included)` : ''} are valid but fall`;
		problems.push({
			code: 'range-gap',
			step: stepId,
			path: ['steps', stepId, 'ranges'],
			message: `${what} in no range, so the flow cannot go on. Cover them, or narrow the domain if such readings are impossible.`
		});
	}
}

function describeBounds(b: { min: number; max: number }, unit: string): string {
	if (b.min === -Infinity && b.max === Infinity) return 'any value';
	if (b.min === -Infinity) return `below ${b.max} ${unit}`;
	if (b.max === Infinity) return `from ${b.min} ${unit} up`;
	return `from ${b.min} up to ${b.max} ${unit}`;
}

function describeDomain(d: Domain, unit: string): string {
	if (d.min !== undefined && d.max !== undefined) return `${d.min}–${d.max} ${unit}`;
	if (d.min !== undefined) return `${d.min} ${unit} and above`;
	if (d.max !== undefined) return `up to ${d.max} ${unit}`;
	return 'any reading';
}
