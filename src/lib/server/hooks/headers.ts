import type { Handle } from '@sveltejs/kit';

/** Security headers beside the CSP that kit.csp writes, and the remembered theme on <html>. */
export const headersHandle: Handle = async ({ event, resolve }) => {
	const theme = event.cookies.get('theme') === 'dark' ? 'dark' : 'light';
	const response = await resolve(event, {
		transformPageChunk: ({ html }) => html.replace('<html lang="en">', `<html lang="en" class="${theme}">`)
	});
	response.headers.set('X-Content-Type-Options', 'nosniff');
	response.headers.set('Referrer-Policy', 'same-origin');
	response.headers.set('X-Frame-Options', 'DENY');
	response.headers.set('Permissions-Policy', 'geolocation=(), microphone=(), camera=(self)');
	return response;
};
