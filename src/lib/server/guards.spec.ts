import fs from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { requireRole, requireUser } from './guards';

const routesDir = path.resolve('src/routes');

/**
 * Entry points that are public on purpose. Everything else must call a guard. Keep this list short
 * and say why each one is here.
 */
const publicAllowList = new Set([
	'(auth)/signin/+page.server.ts', // the sign-in form itself
	'(auth)/signout/+page.server.ts', // clears whatever session the cookie holds
	'api/health/+server.ts', // liveness for monitors and the start-up benchmark; no data
	'api/payments/webhook/+server.ts', // authenticated by the payment service's signature
	'r/[token]/+page.server.ts', // the customer's report: authenticated by the link's token
	'r/[token]/photos/[id]/[size]/+server.ts' // its photos: authenticated by the link's token
]);

function serverEntryPoints(dir: string): string[] {
	return fs
		.readdirSync(dir, { withFileTypes: true, recursive: true })
		.filter((e) => e.isFile() && /^\+(page|layout)\.server\.ts$|^\+server\.ts$/.test(e.name))
		.map((e) => path.relative(routesDir, path.join(e.parentPath, e.name)));
}

const opensWithGuard = (line: string) => /^(?:const [^=]+= )?require(?:User|Role)\(/.test(line.trim());

/** The exported handlers of a route file and, for each, whether its body opens with a guard call. */
function handlers(source: string) {
	const found: { name: string; guarded: boolean }[] = [];
	// `export const load = async (event) => {`, `export const GET: RequestHandler = async (e) => {`
	const fn =
		/export const (load|GET|POST|PUT|PATCH|DELETE)\b[^=]*=\s*async\s*\([^)]*\)\s*=>\s*\{\s*([^\n]*)/g;
	for (const m of source.matchAll(fn)) found.push({ name: m[1], guarded: opensWithGuard(m[2]) });
	// actions: `name: async (event) => {` inside `export const actions`
	const actionsAt = source.indexOf('export const actions');
	if (actionsAt >= 0) {
		const act = /^\t(\w+): async \([^)]*\)\s*=>\s*\{\s*\n?\s*([^\n]*)/gm;
		for (const m of source.slice(actionsAt).matchAll(act))
			found.push({ name: `action ${m[1]}`, guarded: opensWithGuard(m[2]) });
	}
	return found;
}

describe('authorization coverage', () => {
	const files = serverEntryPoints(routesDir);

	it('finds the route files it walks', () => {
		expect(files.length).toBeGreaterThan(4);
		expect(files).toContain('(app)/staff/+page.server.ts');
	});

	it.each(files.filter((f) => !publicAllowList.has(f)))('%s calls a guard first in every handler', (file) => {
		const source = fs.readFileSync(path.join(routesDir, file), 'utf8');
		const found = handlers(source);
		const exported = (source.match(/export const (load|GET|POST|PUT|PATCH|DELETE|actions)\b/g) ?? []).length;
		expect(
			found.length,
			`no handler recognised in ${file}; write handlers as \`export const X = async (event) => {\``
		).toBeGreaterThanOrEqual(exported);
		const unguarded = found.filter((h) => !h.guarded).map((h) => h.name);
		expect(unguarded, `${file}: the first statement must be requireUser(...) or requireRole(...)`).toEqual(
			[]
		);
	});

	it('spots a handler whose first statement is not a guard', () => {
		const bad = `export const load: PageServerLoad = async (event) => {\n\tconst x = await db();\n\trequireUser(event);\n};\nexport const actions = {\n\tsave: async (event) => {\n\t\tconst user = requireRole(event, 'lead');\n\t},\n\tdrop: async ({ request }) => {\n\t\tawait request.formData();\n\t}\n};`;
		expect(handlers(bad)).toEqual([
			{ name: 'load', guarded: false },
			{ name: 'action save', guarded: true },
			{ name: 'action drop', guarded: false }
		]);
	});

	it('every allow-listed file still exists', () => {
		for (const file of publicAllowList) expect(files).toContain(file);
	});
});

describe('guards', () => {
	const event = (user: App.Locals['user'], routeId = '/(app)/staff') => ({
		locals: { user } as App.Locals,
		url: new URL('http://x.test/staff?tab=1'),
		route: { id: routeId }
	});
	const tech = { id: '1', name: 'T', email: 't@x.test', role: 'technician' as const };
	const lead = { ...tech, role: 'lead' as const };

	it('sends a signed-out visitor of a page to sign-in, keeping where they were going', () => {
		expect(() => requireUser(event(null))).toThrow(
			expect.objectContaining({ status: 303, location: '/signin?next=%2Fstaff%3Ftab%3D1' })
		);
	});
	it('answers 401 to a signed-out API caller', () => {
		expect(() => requireUser(event(null, '/api/jobs'))).toThrow(expect.objectContaining({ status: 401 }));
	});
	it('answers 403 below the needed role and passes at or above it (roles are cumulative)', () => {
		expect(() => requireRole(event(tech), 'lead')).toThrow(expect.objectContaining({ status: 403 }));
		expect(requireRole(event(lead), 'senior')).toBe(lead);
		expect(requireRole(event(tech), 'technician')).toBe(tech);
	});
});
