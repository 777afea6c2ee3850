// What the server benchmarks share: the CPU a process used, percentiles, and a throw-away
// PostgreSQL database per measurement.
import fs from 'node:fs';
import { randomUUID } from 'node:crypto';
import pg from 'pg';
import { imeiCheckDigit } from '../src/lib/domain/identifiers';

/** User + system CPU of a process so far, in ms (Linux /proc; clock ticks of 10 ms). */
export function cpuMs(pid: number): number {
	const fields = fs.readFileSync(`/proc/${pid}/stat`, 'utf8').split(') ')[1].split(' ');
	return (Number(fields[11]) + Number(fields[12])) * 10;
}

/** The p-th percentile (nearest rank). */
export const pct = (xs: number[], p: number) => {
	const s = [...xs].sort((a, b) => a - b);
	return s[Math.min(s.length - 1, Math.max(0, Math.ceil((p / 100) * s.length) - 1))];
};

/** A new, empty database on the server DATABASE_URL names, dropped after the measurement. */
export async function freshDatabase(adminUrl: string) {
	const name = `tidemark_bench_${randomUUID().slice(0, 8)}`;
	const admin = new pg.Client({ connectionString: adminUrl });
	await admin.connect();
	await admin.query(`create database ${name}`);
	await admin.end();
	const url = new URL(adminUrl);
	url.pathname = `/${name}`;
	return {
		url: url.href,
		drop: async () => {
			const c = new pg.Client({ connectionString: adminUrl });
			await c.connect();
			await c.query(`drop database if exists ${name} with (force)`);
			await c.end();
		}
	};
}

/** The intake of the i-th bench job: invented customer and phone, a valid test IMEI. */
export function benchIntake(prefix: string, i: number) {
	const body14 = `${prefix}${String(i).padStart(10, '0')}`;
	return {
		customerName: 'Bench Customer',
		customerEmail: 'bench@example.test',
		maker: 'Corvana',
		model: 'Tern 5',
		imei: `${body14}${imeiCheckDigit(body14)}`,
		symptoms: ['restart-loop'],
		liquid: 'fresh',
		submerged: false,
		passcodeStatus: 'withheld',
		consentToOpen: true
	};
}
