import { config } from 'zod/v4/core';

// zod builds a fast path for object schemas with `new Function`, after probing whether eval is
// allowed. Under our content security policy (script-src 'self') that probe is reported as a
// violation on every page that validates with zod; without it, a real violation report stands out.
// Client hooks load before any page module, so this runs before the first parse.
config({ jitless: true });
