/** Only same-site paths are followed after sign-in; anything else goes to the start page. */
export function safeNext(value: string | null | undefined) {
	if (!value || !value.startsWith('/') || value.startsWith('//') || value.startsWith('/\\')) return '/';
	return value;
}
