/**
 * PGlite's own `query` sends a statement as six protocol messages, one pass through the database
 * each (parse, describe, bind, describe, execute, sync), and PostgreSQL parses and plans its text
 * anew every time. Here each statement text is parsed once per client as a named prepared
 * statement, with its parameter and column types; every later call sends bind, execute and sync
 * in one pass. In process a lookup by key through Drizzle takes a third of the time, a guarded
 * update under half (bench/pglite-statements.bench.ts). Results, errors and the locks held are PGlite's own: the same serializers and
 * parsers, the same `DatabaseError`, the query lock always and the transaction lock outside a
 * transaction.
 *
 * Drizzle hands PGlite the same parsers with every query (dates and a few arrays kept as text, for
 * Drizzle to map), and PGlite copies its map of about 300 parsers to merge them each time: here the
 * few a query brings are laid over the client's map instead of copying it.
 */
import {
	parse,
	protocol,
	type PGlite,
	type QueryOptions,
	type Results,
	type Transaction
} from '@electric-sql/pglite';

const { serialize } = protocol;
type Message = Awaited<ReturnType<PGlite['execProtocolStream']>>[number];
type Statement = { name: string; paramTypes: number[]; columns: Message | null };

/** Prepared statements kept per client; the least recently used is closed beyond this. */
export const STATEMENTS_KEPT = 300;

const executeSync = Buffer.concat([serialize.execute({}), serialize.sync()]);

/**
 * Bind (text parameters, text results), execute and sync as one message. pg-protocol's own writer
 * measures each string twice in JavaScript and grows its buffer by copies: a tenth of a step event's
 * CPU, for the snapshot and answer JSON the write carries. Node's Buffer measures and encodes natively.
 */
function bindExecuteSync(statement: string, values: (string | null)[]): Uint8Array {
	const lengths = values.map((v) => (v === null ? -1 : Buffer.byteLength(v)));
	const bind =
		1 +
		4 +
		1 +
		Buffer.byteLength(statement) +
		1 +
		2 +
		2 +
		2 +
		lengths.reduce((n, l) => n + 4 + Math.max(l, 0), 0);
	const out = Buffer.allocUnsafe(bind + executeSync.length);
	let at = out.writeUInt8(0x42, 0); // 'B'
	at = out.writeInt32BE(bind - 1, at);
	at = out.writeUInt8(0, at); // the unnamed portal
	at += out.write(statement, at);
	at = out.writeUInt8(0, at);
	at = out.writeInt16BE(0, at); // no parameter formats: all text
	at = out.writeInt16BE(values.length, at);
	values.forEach((v, i) => {
		at = out.writeInt32BE(lengths[i], at);
		if (v !== null) at += out.write(v, at);
	});
	at = out.writeInt16BE(0, at); // no result formats: all text
	out.set(executeSync, at);
	return out;
}

/** Makes `client.query` (and each transaction's `query`) use prepared statements; returns the client. */
export function withPreparedStatements(client: PGlite): PGlite {
	const statements = new Map<string, Statement>();
	let named = 0;

	/** The statement for this text, parsed and described on first use. */
	async function statementFor(text: string, inTransaction: boolean): Promise<Statement> {
		const kept = statements.get(text);
		if (kept) {
			statements.delete(text);
			statements.set(text, kept);
			return kept;
		}
		const parts: Uint8Array[] = [];
		if (statements.size >= STATEMENTS_KEPT) {
			const [oldText, old] = statements.entries().next().value!;
			statements.delete(oldText);
			parts.push(serialize.close({ type: 'S', name: old.name }));
		}
		const name = `tidemark_${++named}`;
		parts.push(serialize.parse({ name, text }), serialize.describe({ type: 'S', name }), serialize.sync());
		const described = await client.execProtocolStream(Buffer.concat(parts), { syncToFs: !inTransaction });
		const paramTypes = parse.parseDescribeStatementResults(described);
		const columns = described.find((m) => m.name === 'rowDescription') ?? null;
		const statement = { name, paramTypes, columns };
		statements.set(text, statement);
		return statement;
	}

	async function run<T>(
		text: string,
		params: unknown[] = [],
		options: QueryOptions | undefined,
		inTransaction: boolean
	): Promise<Results<T>> {
		try {
			const statement = await statementFor(text, inTransaction);
			const values = params.map((param, i) => {
				if (param === null || param === undefined) return null;
				const oid = statement.paramTypes[i];
				const serializer = options?.serializers?.[oid] ?? client.serializers[oid];
				return serializer ? serializer(param) : String(param);
			});
			const message = values.every((v) => v === null || typeof v === 'string')
				? bindExecuteSync(statement.name, values as (string | null)[])
				: Buffer.concat([serialize.bind({ statement: statement.name, values }), executeSync]);
			const answered = await client.execProtocolStream(message, { syncToFs: !inTransaction });
			const messages = statement.columns ? [statement.columns, ...answered] : answered;
			if (!options?.parsers) return parse.parseResults(messages, client.parsers, options)[0] as Results<T>;
			const parsers = Object.assign(Object.create(client.parsers), options.parsers);
			return parse.parseResults(messages, parsers, { ...options, parsers: undefined })[0] as Results<T>;
		} catch (e) {
			// As PGlite's own query does: the error says which statement failed.
			if (e && typeof e === 'object' && 'code' in e)
				Object.assign(e, { query: text, params, queryOptions: options });
			throw e;
		}
	}

	client.query = async <T>(text: string, params?: unknown[], options?: QueryOptions) => {
		await client._checkReady(); // a closed client refuses, in PGlite's own words
		return client._runExclusiveTransaction(() =>
			client._runExclusiveQuery(() => run<T>(text, params, options, false))
		);
	};
	const transaction = client.transaction.bind(client);
	client.transaction = <T>(fn: (tx: Transaction) => Promise<T>) =>
		transaction((tx: Transaction) => {
			tx.query = async <R>(text: string, params?: unknown[], options?: QueryOptions) => {
				if (tx.closed) throw new Error('Transaction is closed');
				return client._runExclusiveQuery(() => run<R>(text, params, options, true));
			};
			return fn(tx);
		});
	return client;
}
