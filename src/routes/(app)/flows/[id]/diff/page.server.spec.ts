import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as library from '$lib/server/flows/queries';
import { load as pageLoad } from './+page.server';

// Real in-memory PGlite (DATA_DIR=memory://); two versions of a shipped flow imported from files.
const FLOW = 'no-sound-after-liquid';
const text = fs.readFileSync(path.resolve('flows', `${FLOW}.flow.yaml`), 'utf8');
const dirs: string[] = [];
function importText(t: string) {
	const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-diff-'));
	dirs.push(dir);
	fs.writeFileSync(path.join(dir, `${FLOW}.flow.yaml`), t);
	return library.importFromFiles(dir);
}
afterAll(() => dirs.forEach((d) => fs.rmSync(d, { recursive: true, force: true })));

const senior = {
	id: '00000000-0000-4000-8000-000000000001',
	name: 'Senior',
	email: 's@x.test',
	role: 'senior'
};
const tech = { ...senior, role: 'technician' };
function event(query: string, user: object | null = senior) {
	const url = new URL(`http://shop.test/flows/${FLOW}/diff${query}`);
	// eslint-disable-next-line @typescript-eslint/no-explicit-any
	return { url, params: { id: FLOW }, locals: { user }, route: { id: '/(app)/flows/[id]/diff' } } as any;
}

type Data = Exclude<Awaited<ReturnType<typeof pageLoad>>, void>;
const load = async (e: Parameters<typeof pageLoad>[0]) => (await pageLoad(e)) as Data;

let v1: number;
beforeAll(async () => {
	const first = await importText(text);
	expect(first.imported).toHaveLength(1);
	v1 = first.imported[0].version;
	// Version 2: one title changed.
	const changed = text.replace(/^title: .*$/m, 'title: No sound or microphone after liquid (revised)');
	const second = await importText(changed);
	expect(second.imported).toHaveLength(1);
});

describe('diff page load', () => {
	it('compares the newest version with the one before by default', async () => {
		const data = await load(event(''));
		expect(data).toMatchObject({ a: String(v1), b: String(v1 + 1) });
		expect(data.diff?.flow).toEqual([
			expect.objectContaining({ field: 'title', after: 'No sound or microphone after liquid (revised)' })
		]);
		expect(data.diff?.changed).toEqual([]);
	});

	it('compares two chosen versions', async () => {
		const data = await load(event(`?a=${v1 + 1}&b=${v1}`));
		expect(data.diff?.flow[0]).toMatchObject({ before: 'No sound or microphone after liquid (revised)' });
	});

	it('answers 400 for a bad version and 404 for a missing one', async () => {
		await expect(load(event('?a=abc&b=1'))).rejects.toMatchObject({ status: 400 });
		await expect(load(event('?a=1&b=99'))).rejects.toMatchObject({ status: 404 });
	});

	it('refuses technicians with 403', async () => {
		await expect(load(event('', tech))).rejects.toMatchObject({ status: 403 });
	});
});
