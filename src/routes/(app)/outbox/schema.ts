import { z } from 'zod';

/** "Retry now" on a failed mail: a row superform, id `retry-<mail id>`. */
export const retryMail = z.object({ id: z.uuid('That request was malformed.') });

/** "Send a test message" (superform id `send-test`). */
export const sendTest = z.object({ to: z.email('Enter an e-mail address.').max(254) });
