/** 0.2307 → "23 %"; intervals keep one decimal when they are narrow. */
export function percent(x: number, digits = 0) {
	return `${(x * 100).toFixed(digits)} %`;
}

export function intervalText(lower: number, upper: number) {
	const digits = upper - lower < 0.1 ? 1 : 0;
	return `${(lower * 100).toFixed(digits)}–${(upper * 100).toFixed(digits)} %`;
}
