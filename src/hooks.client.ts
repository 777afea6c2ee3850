// zod builds a fast path for object schemas with `new Function`, after probing whether eval is
// allowed. Under our content security policy (script-src 'self') that probe is reported as a
// violation on every page that validates with zod; without it, a real violation report stands out.
// Client hooks load before any page module, so this runs before the first parse. zod keeps its
// configuration on `globalThis.__zod_globalConfig` (shared by every copy of zod), so setting it here
// spares every page, the run screen included, zod's code (hooks.client.spec.ts holds it to zod).
const holder = globalThis as { __zod_globalConfig?: { jitless?: boolean } };
(holder.__zod_globalConfig ??= {}).jitless = true; // the same object zod reads, loaded before or after

export {};
