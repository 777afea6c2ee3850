import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq, sql } from 'drizzle-orm';
import pg from 'pg';
import { getDb, openDatabase, type DB } from '$lib/server/db';
import { flowVersions } from '$lib/server/db/schema/flows';
import { payments } from '$lib/server/db/schema/payments';
import { imeiCheckDigit } from '$lib/domain/identifiers';
import { makeJobIntake } from '$lib/schemas/job';
import * as staff from '$lib/server/staff/queries';
import * as jobs from '$lib/server/jobs/queries';
import * as library from '$lib/server/flows/queries';
import * as runs from '$lib/server/runs/queries';
import * as photos from '$lib/server/photos/queries';
import { recordEvent } from '$lib/server/runs/commit';
import { png } from '$lib/server/photos/fixtures';
import { copyDatabase, CopyRefused, tablesInOrder } from './copy';

// `npm run db:copy`: a shop's records in the embedded database (here the tests' in-memory PGlite)
// copied into a new database on the PostgreSQL server of TEST_DATABASE_URL (.ci/run starts one),
// created for this test and dropped after it. Without that server there is nothing to copy into.
const url = process.env.TEST_DATABASE_URL;
const FLOW = 'restart-loop-after-liquid';

async function all<T>(db: DB, query: ReturnType<typeof sql>) {
	return ((await db.execute(query)) as unknown as { rows: T[] }).rows;
}

/** Every row of a table as PostgreSQL prints it, sorted: two databases agree when these do. */
async function contents(db: DB, table: string) {
	const rows = await all<{ j: string }>(
		db,
		sql`select row_to_json(t)::jsonb::text as j from ${sql.identifier(table)} t`
	);
	return rows.map((r) => r.j).sort();
}

describe.runIf(url)('copying the embedded database to a PostgreSQL server', () => {
	const dbName = `tidemark_copy_${randomUUID().replaceAll('-', '').slice(0, 12)}`;
	// Built in beforeAll: the body of a skipped describe still runs, and there is no URL then.
	const targetUrl = () => Object.assign(new URL(url!), { pathname: `/${dbName}` }).toString();
	let tmp = '';
	let admin: pg.Client;
	let source: DB;
	let target: DB;
	let closeTarget: () => Promise<void>;

	beforeAll(async () => {
		tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'tidemark-copy-'));
		admin = new pg.Client({ connectionString: url });
		await admin.connect();
		await admin.query(`create database ${dbName}`);

		// A shop's records in the embedded database: staff, a job, a flow with a later draft based
		// on it, a run with answered steps, a photo and a paid payment.
		source = await getDb();
		const tech = await staff.create(null, {
			name: 'Wren Halloway',
			email: 'wren@shop.test',
			role: 'senior',
			password: 'senior-password-1'
		});
		fs.copyFileSync(path.resolve('flows', `${FLOW}.flow.yaml`), path.join(tmp, `${FLOW}.flow.yaml`));
		await library.importFromFiles(tmp);
		const body = '00770000000003'; // invented test IMEI body, check digit computed
		const job = await jobs.create(
			tech.id,
			makeJobIntake().parse({
				customerName: 'Maren Ashby',
				customerPhone: '+00 555 0190',
				maker: 'Corvana',
				model: 'Tern 5',
				imei: body + imeiCheckDigit(body),
				symptoms: ['restart-loop'],
				liquid: 'fresh',
				submerged: false,
				passcodeStatus: 'withheld',
				consentToOpen: true
			})
		);
		const run = await runs.start(job.id, FLOW, tech);
		await recordEvent(
			run.id,
			{ type: 'ANSWER', stepId: 'power-on-as-received', outcome: 0, idempotencyKey: randomUUID() },
			tech
		);
		await photos.add(tech.id, await photos.runTarget(run.id, 'power-on-as-received'), {
			bytes: await png(32, 24),
			source: 'microscope',
			caption: 'Residue at the connector'
		});
		await source.insert(payments).values({
			referenceType: 'job',
			referenceId: job.id,
			description: 'Board-level repair',
			amountMinor: 12_950,
			currency: 'eur',
			status: 'paid',
			providerSessionId: `cs_test_${randomUUID()}`,
			paidAt: new Date('2026-03-04T10:11:12.345678Z')
		});
		// A draft whose id sorts before the version it is based on: the copy must send the base first.
		const [published] = await source.select().from(flowVersions).where(eq(flowVersions.flowId, FLOW));
		await source.insert(flowVersions).values({
			...published,
			id: '00000000-0000-4000-8000-000000000001',
			version: null,
			status: 'draft',
			basedOnId: published.id,
			authorId: tech.id
		});

		process.env.DATABASE_URL = targetUrl();
		try {
			const handle = await openDatabase();
			target = handle.db;
			closeTarget = handle.close;
		} finally {
			delete process.env.DATABASE_URL;
		}
	});

	afterAll(async () => {
		await closeTarget?.();
		await admin?.query(`drop database if exists ${dbName} with (force)`);
		await admin?.end();
		if (tmp) fs.rmSync(tmp, { recursive: true, force: true });
	});

	it('orders the tables so that each comes after the tables it refers to', async () => {
		const order = await tablesInOrder(source);
		for (const [child, parent] of [
			['jobs', 'customers'],
			['runs', 'flow_versions'],
			['run_steps', 'runs'],
			['attachments', 'run_steps'],
			['flow_versions', 'flows'],
			['payment_events', 'payments']
		]) {
			expect(order.indexOf(child), `${child} after ${parent}`).toBeGreaterThan(order.indexOf(parent));
		}
	});

	it('copies every row of every table exactly, one row a batch, and carries the sequences on', async () => {
		const lines: string[] = [];
		const report = await copyDatabase(source, target, { batchRows: 1, log: (l) => lines.push(l) });
		const counted = Object.fromEntries(report.map((r) => [r.table, r.target]));
		expect(counted).toMatchObject({
			users: 1,
			jobs: 1,
			runs: 1,
			attachments: 1,
			payments: 1,
			flow_versions: 2
		});
		expect(counted.run_steps).toBeGreaterThanOrEqual(1);
		expect(counted.audit_log).toBeGreaterThan(0);
		expect(report.every((r) => r.source === r.target)).toBe(true);
		expect(lines).toContain('flow_versions: 2 rows');

		for (const { table } of report)
			expect(await contents(target, table), table).toEqual(await contents(source, table));

		// The next job number continues where the embedded database stood.
		const next = async (db: DB) =>
			(await all<{ n: string }>(db, sql`select nextval('job_number_seq')::text as n`))[0].n;
		expect(await next(target)).toBe(await next(source));
	});

	it('refuses a target that already holds rows, and changes nothing there', async () => {
		const before = await contents(target, 'users');
		await expect(copyDatabase(source, target)).rejects.toThrow(CopyRefused);
		await expect(copyDatabase(source, target)).rejects.toThrow(/not empty \(.*users: 1/);
		expect(await contents(target, 'users')).toEqual(before);
	});
});
