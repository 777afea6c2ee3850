import { z } from 'zod';
import { text } from '$lib/schemas/text';

/** GET /api/device-models?q= — intake's maker and model suggestions. */
export const deviceModelQuery = z.object({
	q: text('The search').trim().max(100, 'Search with at most 100 characters.').default('')
});
