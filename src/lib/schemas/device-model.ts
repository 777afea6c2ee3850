import { z } from 'zod';

/** GET /api/device-models?q= — intake's maker and model suggestions. */
export const deviceModelQuery = z.object({
	q: z.string().trim().max(100, 'Search with at most 100 characters.').default('')
});
