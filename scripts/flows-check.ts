/**
 * npm run flows:check -- [--json] [paths…]
 * Checks flow files (default: every flows/*.flow.yaml). One line per problem,
 * `path: step: code: message`; exit code 1 when any file has a problem.
 */
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { basename, join, relative, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { checkFlowText } from '../src/lib/flows/parse';
import type { FlowProblem } from '../src/lib/flows/problems';
import type { FlowStats } from '../src/lib/flows/check';

export interface FileReport {
	file: string;
	ok: boolean;
	problems: FlowProblem[];
	stats: FlowStats | null;
}

const SUFFIX = '.flow.yaml';
const root = resolve(fileURLToPath(new URL('..', import.meta.url)));

function flowFiles(dir: string): string[] {
	return readdirSync(dir)
		.filter((name) => name.endsWith(SUFFIX))
		.sort()
		.map((name) => join(dir, name));
}

export function expand(paths: string[]): string[] {
	if (paths.length === 0) return flowFiles(join(root, 'flows'));
	return paths.flatMap((p) => {
		try {
			return statSync(p).isDirectory() ? flowFiles(p) : [p];
		} catch {
			return [p]; // reported as unreadable by checkFile
		}
	});
}

export function checkFile(path: string): FileReport {
	const file = relative(process.cwd(), path) || path;
	let text: string;
	try {
		text = readFileSync(path, 'utf8');
	} catch (e) {
		const message = `cannot read the file: ${e instanceof Error ? e.message : String(e)}`;
		return { file, ok: false, problems: [{ code: 'schema', message }], stats: null };
	}
	const name = basename(path);
	const fileStem = name.endsWith(SUFFIX) ? name.slice(0, -SUFFIX.length) : undefined;
	const { ok, problems, stats } = checkFlowText(text, { fileStem });
	return { file, ok, problems, stats };
}

export function formatReport(report: FileReport): string[] {
	if (report.ok) {
		const s = report.stats;
		return [`${report.file}: ok${s ? ` (${s.steps} steps, ${s.verdicts.length} verdicts)` : ''}`];
	}
	return report.problems.map((p) => `${report.file}: ${p.step ?? '(flow)'}: ${p.code}: ${p.message}`);
}

function main(argv: string[]): number {
	const json = argv.includes('--json');
	const paths = argv.filter((a) => a !== '--json' && a !== '--');
	const reports = expand(paths).map(checkFile);
	if (json) console.log(JSON.stringify(reports, null, 2));
	else {
		if (reports.length === 0) console.log('No flow files found.');
		for (const r of reports) for (const line of formatReport(r)) console.log(line);
		const bad = reports.filter((r) => !r.ok).length;
		if (bad) console.log(`\n${bad} of ${reports.length} flow file(s) have problems.`);
	}
	return reports.every((r) => r.ok) ? 0 : 1;
}

if (process.argv[1] && resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
	process.exitCode = main(process.argv.slice(2));
}
