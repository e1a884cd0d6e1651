/**
 * The lead's desk: what the overview reads, and the note kept with a settled clash.
 *
 * - readings: `server_verdict` (the workshop's verdict, also inside `server_result`) and
 *   `range_unresolved` (1 when the range read on could not tell a reading from the spec's
 *   limits, 0 when it could, NULL when the test pinned no sheet), both written by the sync
 *   path; existing rows are filled here. The index on `test_id` grows to cover them, so the
 *   overview's per-test summary never reads the rows themselves.
 * - tests: the meter's name, lead resistance and relative mode as columns computed from the
 *   `meter` snapshot, and an index by workshop and arrival date.
 * - conflicts: the lead's note when settling.
 */
import { QueryTypes, type Sequelize } from 'sequelize';
import type { MigrationContext } from '../src/lib/server/db/migrator';
import { rangeUnresolvedOf } from '../src/lib/flow/reading';
import { parseNumbers } from '../src/lib/sync/json';

const raw = (s: Sequelize, sql: string) => s.query(sql, { type: QueryTypes.RAW });

const UP = [
	`ALTER TABLE readings
		ADD COLUMN server_verdict VARCHAR(12) NULL AFTER server_result,
		ADD COLUMN range_unresolved TINYINT(1) NULL AFTER server_verdict`,
	`ALTER TABLE tests
		ADD COLUMN meter_name VARCHAR(60) AS (LEFT(JSON_VALUE(meter, '$.name'), 60)) PERSISTENT,
		ADD COLUMN lead_ohms DOUBLE AS (JSON_VALUE(meter, '$.leadResistance')) PERSISTENT,
		ADD COLUMN relative_mode TINYINT(1) AS (IF(JSON_VALUE(meter, '$.relativeMode') IN ('true', '1'), 1, 0)) PERSISTENT`,
	'CREATE INDEX tests_workshop_created ON tests (workshop_id, created_at)',
	'ALTER TABLE conflicts ADD COLUMN settled_note VARCHAR(500) NULL AFTER settled_value'
];

const DOWN = [
	'ALTER TABLE conflicts DROP COLUMN settled_note',
	'ALTER TABLE tests DROP INDEX tests_workshop_created',
	'ALTER TABLE tests DROP COLUMN relative_mode, DROP COLUMN lead_ohms, DROP COLUMN meter_name',
	'ALTER TABLE readings ADD KEY readings_test (test_id), DROP KEY readings_test_summary',
	'ALTER TABLE readings DROP COLUMN range_unresolved, DROP COLUMN server_verdict'
];

type Row = { id: string; range_label: string | null; check_key: string; meter: string | null; temperature: string | null; checks: string | null };

/** Fill `range_unresolved` for readings stored before the column existed, in id order. */
export async function fillRangeUnresolved(s: Sequelize, slice = 2000): Promise<number> {
	let done = 0;
	let after = '00000000-0000-0000-0000-000000000000';
	for (;;) {
		const rows = await s.query<Row>(
			`SELECT r.id, r.range_label, r.check_key, t.meter, t.temperature, sh.checks
			 FROM readings r JOIN tests t ON t.id = r.test_id
			 LEFT JOIN spec_sheets sh ON sh.id = t.sheet_id
			 WHERE r.range_unresolved IS NULL AND r.id > ? ORDER BY r.id LIMIT ${slice}`,
			{ replacements: [after], type: QueryTypes.SELECT }
		);
		if (!rows.length) return done;
		after = rows[rows.length - 1].id;
		const known = rows.flatMap((r) => {
			const checks = r.checks ? (parseNumbers(r.checks) as Parameters<typeof rangeUnresolvedOf>[0][]) : [];
			const check = checks.find((c) => c.key === r.check_key);
			if (!check) return [];
			const unresolved = rangeUnresolvedOf(
				check,
				r.meter ? JSON.parse(r.meter) : null,
				r.range_label,
				r.temperature ? JSON.parse(r.temperature) : { mode: 'unknown' }
			);
			return [[r.id, unresolved ? 1 : 0] as const];
		});
		for (const v of [0, 1]) {
			const ids = known.filter(([, u]) => u === v).map(([id]) => id);
			if (ids.length)
				await s.query('UPDATE readings SET range_unresolved = ? WHERE id IN (?)', {
					replacements: [v, ids],
					type: QueryTypes.UPDATE
				});
		}
		done += known.length;
	}
}

export async function up({ sequelize }: MigrationContext): Promise<void> {
	for (const sql of UP) await raw(sequelize, sql);
	await sequelize.query(
		"UPDATE readings SET server_verdict = JSON_VALUE(server_result, '$.verdict') WHERE server_result IS NOT NULL",
		{ type: QueryTypes.UPDATE }
	);
	await fillRangeUnresolved(sequelize);
	await raw(
		sequelize,
		'ALTER TABLE readings ADD KEY readings_test_summary (test_id, server_verdict, range_unresolved), DROP KEY readings_test'
	);
}

export async function down({ sequelize }: MigrationContext): Promise<void> {
	for (const sql of DOWN) await raw(sequelize, sql);
}
