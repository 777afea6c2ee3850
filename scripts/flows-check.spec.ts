import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { checkFile, expand, formatReport } from './flows-check';

const root = fileURLToPath(new URL('..', import.meta.url));
const fixture = (name: string) => `tests/fixtures/flows/${name}.flow.yaml`;

function cli(...args: string[]) {
	const run = spawnSync(process.execPath, ['--import', 'tsx', 'scripts/flows-check.ts', ...args], {
		cwd: root,
		encoding: 'utf8'
	});
	return { code: run.status, out: run.stdout, err: run.stderr };
}

describe('flows:check', () => {
	it('prints one `path: step: code: message` line per problem', () => {
		const lines = formatReport(checkFile(`${root}/${fixture('unknown-target')}`));
		expect(lines).toHaveLength(1);
		expect(lines[0]).toMatch(
			/^tests\/fixtures\/flows\/unknown-target\.flow\.yaml: symptom: unknown-target: Answer "Crackling" leads to "open-and-lok"/
		);
	});

	it('uses (flow) where a problem belongs to no step, and checks the id against the file name', () => {
		const [line] = formatReport(checkFile(`${root}/${fixture('id-mismatch')}`));
		expect(line).toContain('id-mismatch.flow.yaml: (flow): id-mismatch: ');
	});

	it('reports an unreadable file as a problem', () => {
		const report = checkFile(`${root}/tests/fixtures/flows/none.flow.yaml`);
		expect(report.ok).toBe(false);
		expect(report.problems[0].message).toContain('cannot read the file');
	});

	it('defaults to every flows/*.flow.yaml and expands folders', () => {
		expect(expand([]).every((p) => /\/flows\/[a-z0-9-]+\.flow\.yaml$/.test(p))).toBe(true);
		expect(expand([`${root}/tests/fixtures/flows`])).toHaveLength(21); // one broken fixture per problem code, and the valid ones
	});

	it('exits 0 on a sound flow and 1 on a broken one', () => {
		const good = cli(fixture('valid'));
		expect(good.code).toBe(0);
		expect(good.out).toContain('valid.flow.yaml: ok (7 steps, 3 verdicts)');
		const bad = cli(fixture('valid'), fixture('dead-end'));
		expect(bad.code).toBe(1);
		expect(bad.out.split('\n').filter((l) => l.includes(': dead-end: '))).toHaveLength(2);
	});

	it('prints {file, ok, problems, stats} for every file with --json', () => {
		const run = cli('--json', fixture('valid'), fixture('range-gap'));
		expect(run.code).toBe(1);
		const reports = JSON.parse(run.out);
		expect(reports.map((r: { file: string; ok: boolean }) => [r.file, r.ok])).toEqual([
			[fixture('valid'), true],
			[fixture('range-gap'), false]
		]);
		expect(reports[1].problems[0]).toMatchObject({ code: 'range-gap', step: 'speaker-resistance' });
		expect(reports[0].stats.byKind).toEqual({ symptom: 1, test: 2, measure: 1, verdict: 3 });
	});
});
