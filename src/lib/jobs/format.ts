/** Display helpers shared by the job pages. Fixed locale so server and browser render the same words. */
const dateTime = new Intl.DateTimeFormat('en-GB', { dateStyle: 'medium', timeStyle: 'short' });
const dateOnly = new Intl.DateTimeFormat('en-GB', { dateStyle: 'medium' });

export function formatDateTime(value: Date | string | null | undefined) {
	if (!value) return '—';
	const d = typeof value === 'string' ? new Date(value) : value;
	return Number.isNaN(d.getTime()) ? '—' : dateTime.format(d);
}

export function formatDate(value: Date | string | null | undefined) {
	if (!value) return '—';
	const d = typeof value === 'string' ? new Date(value) : value;
	return Number.isNaN(d.getTime()) ? '—' : dateOnly.format(d);
}

/** An IMEI in the groups printed on labels (TAC 8 · serial 6 · check 1) so it can be read aloud. */
export function groupImei(imei: string) {
	return /^\d{15}$/.test(imei) ? `${imei.slice(0, 8)} ${imei.slice(8, 14)} ${imei.slice(14)}` : imei;
}
