/**
 * Small statistics for insights and for "past runs from this step": how often a verdict comes up
 * (with an honest interval when the counts are small) and how long diagnosis takes.
 */

// Wichura, M. J. (1988). Algorithm AS 241: The percentage points of the normal distribution.
// Applied Statistics 37(3):477–484. PPND16, accurate to about 1 part in 10^16.
// The coefficients are kept as published (20 digits) so they can be compared with the paper.
/* eslint-disable no-loss-of-precision */
const A = [
	3.387132872796366608, 133.14166789178437745, 1971.5909503065514427, 13731.693765509461125,
	45921.953931549871457, 67265.770927008700853, 33430.575583588128105, 2509.0809287301226727
];
const B = [
	1, 42.313330701600911252, 687.1870074920579083, 5394.1960214247511077, 21213.794301586595867,
	39307.89580009271061, 28729.085735721942674, 5226.495278852854561
];
const C = [
	1.42343711074968357734, 4.6303378461565452959, 5.7694972214606914055, 3.64784832476320460504,
	1.27045825245236838258, 0.24178072517745061177, 0.0227238449892691845833, 7.7454501427834140764e-4
];
const D = [
	1, 2.05319162663775882187, 1.6763848301838038494, 0.68976733498510000455, 0.14810397642748007459,
	0.0151986665636164571966, 5.475938084995344946e-4, 1.05075007164441684324e-9
];
const E = [
	6.6579046435011037772, 5.4637849111641143699, 1.7848265399172913358, 0.29656057182850489123,
	0.026532189526576123093, 0.0012426609473880784386, 2.71155556874348757815e-5, 2.01033439929228813265e-7
];
const F = [
	1, 0.59983220655588793769, 0.13692988092273580531, 0.0148753612908506148525, 7.868691311456132591e-4,
	1.8463183175100546818e-5, 1.4215117583164458887e-7, 2.04426310338993978564e-15
];
/* eslint-enable no-loss-of-precision */

/** Evaluates a[0] + a[1]·x + … + a[7]·x⁷ (Horner). */
const poly = (a: number[], x: number) => a.reduceRight((sum, coefficient) => sum * x + coefficient, 0);

/**
 * The standard normal quantile Φ⁻¹(p) by AS 241. p = 0 and 1 give ∓Infinity; anything outside
 * [0, 1] (or NaN) is a RangeError. Used instead of the rounded 1.96 so intervals match published
 * tables to the last printed digit.
 */
export function normalQuantile(p: number): number {
	if (!(p >= 0 && p <= 1)) throw new RangeError(`normalQuantile: p must be in [0, 1] (got ${p})`);
	if (p === 0) return -Infinity;
	if (p === 1) return Infinity;
	const q = p - 0.5;
	if (Math.abs(q) <= 0.425) {
		const r = 0.180625 - q * q;
		return (q * poly(A, r)) / poly(B, r);
	}
	let r = Math.sqrt(-Math.log(q < 0 ? p : 1 - p));
	let x: number;
	if (r <= 5) {
		r -= 1.6;
		x = poly(C, r) / poly(D, r);
	} else {
		r -= 5;
		x = poly(E, r) / poly(F, r);
	}
	return q < 0 ? -x : x;
}

function assertCount(name: string, value: number): void {
	if (!Number.isSafeInteger(value) || value < 0) {
		throw new RangeError(`wilsonInterval: ${name} must be a whole number ≥ 0 (got ${value})`);
	}
}

/**
 * Wilson score interval for a proportion (Wilson 1927, JASA 22:209–212), chosen over the textbook
 * p ± z·√(p(1−p)/n) because it stays inside [0, 1] and behaves at 0/n and n/n, which is where a
 * shop's small counts live. Uses the exact normal quantile for `confidence` (two-sided).
 *
 * n = 0: no runs tell us nothing, so the interval is the whole range, { lower: 0, upper: 1 }.
 * Bad input (negative or fractional counts, successes > n, confidence not in (0, 1)) is a RangeError.
 */
export function wilsonInterval(
	successes: number,
	n: number,
	confidence = 0.95
): { lower: number; upper: number } {
	assertCount('successes', successes);
	assertCount('n', n);
	if (successes > n) throw new RangeError(`wilsonInterval: successes (${successes}) exceed n (${n})`);
	if (!(confidence > 0 && confidence < 1)) {
		throw new RangeError(`wilsonInterval: confidence must be in (0, 1) (got ${confidence})`);
	}
	if (n === 0) return { lower: 0, upper: 1 };
	const z = normalQuantile(1 - (1 - confidence) / 2);
	const z2 = z * z;
	// (2x + z² ± z·√(z² + 4x(n−x)/n)) / (2(n + z²)): the form without p̂ loses less precision.
	const centre = 2 * successes + z2;
	const spread = z * Math.sqrt(z2 + (4 * successes * (n - successes)) / n);
	const denominator = 2 * (n + z2);
	return {
		// The bounds are exactly 0 at x = 0 and 1 at x = n; say so rather than trust rounding.
		lower: successes === 0 ? 0 : (centre - spread) / denominator,
		upper: successes === n ? 1 : (centre + spread) / denominator
	};
}

/** A sorted copy; a Float64Array sorts numerically by itself and several times faster than an array. */
function sortedCopy(values: readonly number[], fn: string): Float64Array {
	if (values.length === 0) throw new RangeError(`${fn}: needs at least one value`);
	for (const value of values) {
		if (!Number.isFinite(value)) throw new RangeError(`${fn}: values must be finite numbers (got ${value})`);
	}
	return Float64Array.from(values).sort();
}

/**
 * The p-th percentile (p in [0, 100]) by linear interpolation between order statistics — Hyndman &
 * Fan (1996, The American Statistician 50:361–365, cited from memory) type 7, the default of R's quantile() and of numpy.percentile. Position h = (n−1)·p/100
 * in the sorted values; the result interpolates between the values either side of h.
 * Empty input, non-finite values or p outside [0, 100] are a RangeError; the input is not modified.
 */
export function percentile(values: readonly number[], p: number): number {
	if (!(p >= 0 && p <= 100)) throw new RangeError(`percentile: p must be in [0, 100] (got ${p})`);
	const sorted = sortedCopy(values, 'percentile');
	const h = ((sorted.length - 1) * p) / 100;
	const below = Math.floor(h);
	const above = Math.min(below + 1, sorted.length - 1);
	return sorted[below] + (h - below) * (sorted[above] - sorted[below]);
}

/** The median: the middle value, or the mean of the two middle values (= percentile 50, type 7). */
export function median(values: readonly number[]): number {
	const sorted = sortedCopy(values, 'median');
	const middle = sorted.length >> 1;
	return sorted.length % 2 === 1 ? sorted[middle] : (sorted[middle - 1] + sorted[middle]) / 2;
}
