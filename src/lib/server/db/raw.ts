/**
 * Raw statements on a transaction's own driver connection, for the sync push hot path:
 * Sequelize's replacement formatting of hundreds of rows costs more than the statement
 * itself, so these bypass it (same SQL, same transaction). The one home for raw SQL helpers.
 * `rawRows` does the same for the sync pull's reads, on a connection of the same pool.
 */
import type { Transaction } from 'sequelize';
import { db } from '.';

type DriverConnection = {
	query: (sql: string, values?: unknown[]) => Promise<unknown>;
	batch: (sql: string, values: unknown[][]) => Promise<unknown>;
};

/** Call the transaction's driver connection; a deadlock ends the transaction as Sequelize does. */
async function onDriver<T>(
	t: Transaction,
	call: (conn: DriverConnection) => Promise<unknown>
): Promise<T> {
	const conn = (t as unknown as { connection?: DriverConnection }).connection;
	if (!conn) throw new Error('a driver call needs a started transaction');
	try {
		return (await call(conn)) as T;
	} catch (e) {
		if ((e as { errno?: number }).errno === 1213) {
			await t.rollback().catch(() => {});
			(t as unknown as { finished: string }).finished = 'rollback';
		}
		throw e;
	}
}

/**
 * Run `sql` with `?` placeholders (an array value becomes a comma-separated list) on the
 * transaction's driver connection; the driver escapes the values.
 */
export const rawQuery = <T = unknown>(t: Transaction, sql: string, values?: unknown[]) =>
	onDriver<T>(t, (conn) => conn.query(sql, values));

/**
 * Run a one-row statement for many rows at once with the driver's batch: MariaDB's bulk
 * protocol, the statement prepared once and the rows sent in binary, no escaping. The
 * cheapest way found to insert hundreds of rows (see `npm run bench:sync`); inside the
 * caller's transaction, so nothing commits per row.
 */
export const rawBatch = <T = unknown>(t: Transaction, sql: string, rows: unknown[][]) =>
	onDriver<T>(t, (conn) => conn.batch(sql, rows));

/** A Date as MariaDB's DATETIME(3) text in UTC (the connection's time zone is UTC). */
export const sqlDateTime = (d: Date) => d.toISOString().slice(0, 23).replace('T', ' ');

/** A column of a `rawRows` answer: its name, the driver's type name (`DATETIME`, `BIGINT`, …), whether it is a UUID. */
export type RawColumn = { name: string; type: string; uuid: boolean };

type ReadConnection = {
	query: (opts: Record<string, unknown>, values?: unknown[]) => Promise<unknown[][] & { meta: { name(): string; type: string; dataTypeName?: string }[] }>;
};
type Pool = { getConnection(o: { type: 'read' }): Promise<ReadConnection>; releaseConnection(c: ReadConnection): Promise<void> };

/**
 * A SELECT through the driver alone, on a connection of the one pool: rows as arrays, no
 * per-column type cast (Sequelize's cast on every value cost more than the read itself),
 * DATETIME as its text (`YYYY-MM-DD HH:MM:SS.mmm`, UTC), JSON text left as text. For reads
 * of many rows that go straight out as JSON (the sync pull, `sync/pull-json.ts`).
 */
export async function rawRows(sql: string, values: unknown[]): Promise<{ rows: unknown[][]; columns: RawColumn[] }> {
	const pool = db().connectionManager as unknown as Pool;
	const conn = await pool.getConnection({ type: 'read' });
	try {
		const rows = await conn.query({ sql, rowsAsArray: true, typeCast: false, dateStrings: true, autoJsonMap: false }, values);
		return { rows, columns: rows.meta.map((m) => ({ name: m.name(), type: m.type, uuid: m.dataTypeName === 'uuid' })) };
	} finally {
		await pool.releaseConnection(conn);
	}
}
