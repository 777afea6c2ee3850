import { json } from '@sveltejs/kit';
import { z } from 'zod';
import type { RequestHandler } from './$types';

const body = z.object({ theme: z.enum(['light', 'dark']) });

// Public (allow-listed): the theme is a display preference, also used on the sign-in page.
export const POST: RequestHandler = async ({ request, cookies }) => {
	const parsed = body.safeParse(await request.json().catch(() => null));
	if (!parsed.success) return json({ message: 'theme must be "light" or "dark"' }, { status: 400 });
	cookies.set('theme', parsed.data.theme, {
		path: '/',
		httpOnly: false,
		sameSite: 'lax',
		maxAge: 60 * 60 * 24 * 365
	});
	return json({ theme: parsed.data.theme });
};
