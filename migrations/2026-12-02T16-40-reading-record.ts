/**
 * Each reading keeps the change the pull sends for it, as JSON text written once by the
 * database: `record_json`, a STORED generated column. Readings are append-only and by far the
 * largest table; writing their records at read time (reading some twenty columns with the
 * driver, then writing them out as JSON) cost the pull more than the database's read itself
 * (`npm run bench:pull`). With the text kept, the pull reads two columns and copies one. The
 * column is a BLOB holding the text's UTF-8 bytes: the driver hands those over as they came,
 * where text would be decoded into a string and encoded again.
 *
 * The text is the change after its seq, as `sync/pull-json.ts` writes it:
 *
 *     ,"entity":"reading","entityId":…,"version":1,"op":"upsert","record":{…}}
 *
 * (the pull puts `{"seq":N` in front). The record is `appendRecord`'s: every column but the
 * hidden ones, camelCase, stored JSON spliced in as it is, dates as `Date#toJSON` writes them,
 * flags as true/false. Where stored JSON holds the strings that stand for ±Infinity (an OL
 * reading), the column is NULL and the pull writes that record as it writes any other table's
 * (JSON has no Infinity: the value goes out as null beside `ol: true`).
 *
 * A column added to `readings` later must be added here too (a new migration that drops and
 * adds `record_json` again); `tests/integration/pull-json.test.ts` fails until it is, since it
 * compares the pull with `appendRecord` over the table's own columns.
 */
import { QueryTypes, type Sequelize } from 'sequelize';
import type { MigrationContext } from '../src/lib/server/db/migrator';

const raw = (s: Sequelize, sql: string) => s.query(sql, { type: QueryTypes.RAW });

const text = (col: string) => `IFNULL(JSON_QUOTE(${col}), 'null')`;
const uuid = (col: string) => `IFNULL(CONCAT('"', ${col}, '"'), 'null')`;
/** DATETIME(3) text `2026-12-02 16:26:02.244` as `"2026-12-02T16:26:02.244Z"`. */
const iso = (col: string) => `IFNULL(CONCAT('"', INSERT(CAST(${col} AS CHAR), 11, 1, 'T'), 'Z"'), 'null')`;
const stored = (col: string) => `IFNULL(${col}, 'null')`;
/** A flag as `appendRecord` writes it: `Boolean(v)`, or null kept as null. */
const flag = (col: string) => `IF(${col}, 'true', 'false')`;
const flagOrNull = (col: string) => `CASE WHEN ${col} IS NULL THEN 'null' WHEN ${col} THEN 'true' ELSE 'false' END`;

/** The record's fields in the table's column order: key, SQL of the value. */
const FIELDS: [string, string][] = [
	['id', uuid('id')],
	['jobId', uuid('job_id')],
	['createdBy', uuid('created_by')],
	['deviceId', text('device_id')],
	['deviceTime', iso('device_time')],
	['createdAt', iso('created_at')],
	['testId', uuid('test_id')],
	['checkKey', text('check_key')],
	['position', text('position')],
	['samples', stored('samples')],
	['visual', stored('visual')],
	['rangeLabel', text('range_label')],
	['deviceResult', stored('device_result')],
	['serverResult', stored('server_result')],
	['serverVerdict', text('server_verdict')],
	['rangeUnresolved', flagOrNull('range_unresolved')],
	['mismatch', flag('mismatch')]
];

const RECORD_SQL = `IF(CONCAT_WS('', samples, visual, device_result, server_result) LIKE '%Infinity%', NULL, CONCAT(
	',"entity":"reading","entityId":', ${uuid('id')}, ',"version":1,"op":"upsert","record":{"entity":"reading"',
	${FIELDS.map(([key, sql]) => `',"${key}":', ${sql}`).join(',\n\t')},
	',"version":1}}'))`;

export async function up({ sequelize }: MigrationContext): Promise<void> {
	await raw(sequelize, `ALTER TABLE readings ADD COLUMN record_json MEDIUMBLOB AS (${RECORD_SQL}) STORED`);
}

export async function down({ sequelize }: MigrationContext): Promise<void> {
	await raw(sequelize, 'ALTER TABLE readings DROP COLUMN record_json');
}
