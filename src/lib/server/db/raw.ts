/**
 * Raw statements on a transaction's own driver connection, for the sync push hot path:
 * Sequelize's replacement formatting of hundreds of rows costs more than the statement
 * itself, so these bypass it (same SQL, same transaction). The one home for raw SQL helpers.
 */
import type { Transaction } from 'sequelize';

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
