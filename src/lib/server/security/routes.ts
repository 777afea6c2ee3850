// Every server entry point under src/routes, found from the file system: a new route joins the
// security suite (matrix.spec.ts, fuzz.spec.ts) without anyone remembering to add it — and the
// suite fails until its expected access is written in access.ts.
import fs from 'node:fs';
import path from 'node:path';

export const routesDir = path.resolve('src/routes');

export type Entry = {
	/** `/(app)/jobs/[id] load`, `/api/jobs POST`, `/(app)/staff action create` */
	key: string;
	routeId: string;
	file: string;
	kind: 'load' | 'layout load' | 'action' | 'method';
	/** HTTP method for `method`, action name for `action`. */
	name: string;
};

const METHODS = ['GET', 'POST', 'PUT', 'PATCH', 'DELETE'] as const;

/** Action names of `export const actions = { a: async …, b: async … }` (one tab of indent, as written here). */
function actionNames(source: string) {
	const at = source.indexOf('export const actions');
	if (at < 0) return [];
	return [...source.slice(at).matchAll(/^\t(\w+): async\b/gm)].map((m) => m[1]);
}

export function discoverEntries(): Entry[] {
	const files = fs
		.readdirSync(routesDir, { withFileTypes: true, recursive: true })
		.filter((e) => e.isFile() && /^\+(page|layout)\.server\.ts$|^\+server\.ts$/.test(e.name))
		.map((e) => path.relative(routesDir, path.join(e.parentPath, e.name)))
		.sort();
	const out: Entry[] = [];
	for (const file of files) {
		const source = fs.readFileSync(path.join(routesDir, file), 'utf8');
		const dir = path.dirname(file);
		const routeId = dir === '.' ? '/' : `/${dir.split(path.sep).join('/')}`;
		const add = (kind: Entry['kind'], name: string) =>
			out.push({
				key: `${routeId} ${kind === 'method' ? name : kind === 'action' ? `action ${name}` : kind}`,
				routeId,
				file,
				kind,
				name
			});
		if (file.endsWith('+server.ts')) {
			for (const m of METHODS) if (new RegExp(`export const ${m}\\b`).test(source)) add('method', m);
		} else {
			const layout = file.endsWith('+layout.server.ts');
			if (/export const load\b/.test(source)) add(layout ? 'layout load' : 'load', 'load');
			for (const a of actionNames(source)) add('action', a);
		}
	}
	return out;
}

/** Pages (+page.svelte) with no +page.server.ts: rendered behind their layout's load only. */
export function pagesWithoutServer(): string[] {
	return fs
		.readdirSync(routesDir, { withFileTypes: true, recursive: true })
		.filter((e) => e.isFile() && e.name === '+page.svelte')
		.map((e) => path.relative(routesDir, e.parentPath))
		.filter((dir) => !fs.existsSync(path.join(routesDir, dir, '+page.server.ts')))
		.map((dir) => (dir === '' ? '/' : `/${dir.split(path.sep).join('/')}`));
}
