import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';

// src/lib is the layer below the routes: the app's code and the shared test harnesses there never
// import a route module. Code that serves one route lives beside that route instead, and shared
// types live in src/lib for both. Specs (the graph's leaves) may drive a route's handlers.
// The one allowed exception enumerates every route on purpose (the access-rule harness).
const allowed = new Set(['src/lib/server/security/harness.ts']);

function files(dir: string): string[] {
	return readdirSync(dir, { withFileTypes: true }).flatMap((e) => {
		const path = join(dir, e.name);
		if (e.isDirectory()) return files(path);
		return /\.(ts|js|svelte|svx)$/.test(e.name) && !/\.spec\.ts$/.test(e.name) ? [path] : [];
	});
}

/** `from '…routes/…'`, `import('…routes/…')`, `import.meta.glob('/src/routes/…')`. */
const routeImport = /(?:\bfrom\s*|\bimport\s*\(\s*|\bglob\s*\(\s*)['"`][^'"`]*\broutes\//;

function routeImportsIn(source: string) {
	return source.split('\n').filter((line) => routeImport.test(line));
}

describe('layering', () => {
	it('finds each way of importing a route module (so the check below can fail)', () => {
		expect(routeImportsIn(`import type { X } from '../../routes/api/jobs/+server';`)).toHaveLength(1);
		expect(routeImportsIn(`const m = await import("../routes/(app)/+page.server");`)).toHaveLength(1);
		expect(routeImportsIn(`import.meta.glob('/src/routes/**/+server.ts')`)).toHaveLength(1);
		expect(routeImportsIn(`import { x } from '$lib/server/routes-table';`)).toHaveLength(0);
	});

	it('no file under src/lib (but specs) imports from src/routes', () => {
		const offenders = files('src/lib')
			.filter((f) => !allowed.has(f.split('\\').join('/')))
			.flatMap((f) => routeImportsIn(readFileSync(f, 'utf8')).map((line) => `${f}: ${line.trim()}`));
		expect(offenders).toEqual([]);
	});
});
