import fs from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';

// docs/deploy.md tells a shop which environment variables to set. Each one it names must be read
// somewhere: by Tidemark's code (src/, scripts/) or by the server adapter it runs on.
const guide = fs.readFileSync('docs/deploy.md', 'utf8');

function filesUnder(dir: string): string[] {
	return fs
		.readdirSync(dir, { recursive: true, withFileTypes: true })
		.filter((e) => e.isFile() && /\.(ts|js|mjs|svelte)$/.test(e.name) && !/\.spec\./.test(e.name))
		.map((e) => path.join(e.parentPath, e.name));
}

const code = [
	...filesUnder('src'),
	...filesUnder('scripts'),
	...filesUnder('node_modules/@sveltejs/adapter-node/files')
]
	.map((f) => fs.readFileSync(f, 'utf8'))
	.join('\n');

/** Names set as `NAME=` in the guide's examples or written as `NAME` in its text. */
function namedVariables() {
	const names = new Set<string>();
	for (const m of guide.matchAll(/^\s*([A-Z][A-Z0-9_]+)=/gm)) names.add(m[1]);
	for (const m of guide.matchAll(/\s([A-Z][A-Z0-9]*(?:_[A-Z0-9]+)+)=/g)) names.add(m[1]);
	for (const m of guide.matchAll(/`([A-Z][A-Z0-9]*(?:_[A-Z0-9]+)+)`/g)) names.add(m[1]);
	for (const m of guide.matchAll(/`(HOST|PORT|ORIGIN)`/g)) names.add(m[1]);
	return [...names].sort();
}

describe('the deploy guide', () => {
	const names = namedVariables();

	it('names the settings a shop needs', () => {
		for (const n of [
			'ORIGIN',
			'PUBLIC_BASE_URL',
			'AUTH_SECRET',
			'DATA_DIR',
			'BODY_SIZE_LIMIT',
			'DATABASE_URL',
			'S3_BUCKET'
		])
			expect(names).toContain(n);
	});

	it.each(names)('names %s, which the code reads', (name) => {
		const read = new RegExp(`env\\.${name}\\b|env\\(['"]${name}['"]|['"]${name}['"]|\\b${name}:`);
		expect(read.test(code), `${name} is named in docs/deploy.md but read nowhere`).toBe(true);
	});
});
