/**
 * A measure range in words read at a glance. Ranges include min and exclude max ("under");
 * a domain (the valid readings) includes both ends ("up to").
 */
export function rangeText(
	min: number | undefined,
	max: number | undefined,
	unit: string,
	domain = false
): string {
	if (min === undefined && max === undefined) return 'any reading';
	if (min === undefined) return `${domain ? 'up to' : 'under'} ${max} ${unit}`;
	if (max === undefined) return `${min} ${unit} or more`;
	return `${min} to ${domain ? '' : 'under '}${max} ${unit}`;
}
