/**
 * The lead's desk: what the overview reads, and the note kept with a settled clash.
 *
 * - readings: `server_verdict` (the workshop's verdict, also inside `server_result`) and
 *   `range_unresolved` (1 when the range read on could not tell a reading from the spec's
 *   limits, 0 when it could, NULL when the test pinned no sheet), both written by the sync
 *   path; existing rows are filled here.
 * - test_summaries: per test, how many of its readings were under or over spec, can't tell,
 *   OK, and taken on a range that could not resolve the spec. The sync path adds each push's
 *   readings to it (one statement per push), so the overview reads one row per test instead
 *   of every reading. Filled here from the readings already stored.
 * - tests: the meter's name, lead resistance and relative mode as columns computed from the
 *   `meter` snapshot, and an index by workshop and arrival date that covers what the
 *   overview reads.
 * - conflicts: the lead's note when settling.
 */
import { QueryTypes, type Sequelize } from 'sequelize';
import type { MigrationContext } from '../src/lib/server/db/migrator';
import { rangeUnresolvedOf, type CheckSpec } from '../src/lib/flow/reading';
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
	`CREATE INDEX tests_overview ON tests
		(workshop_id, created_at, deleted_at, state, part_number, technician_id, meter_name, relative_mode, lead_ohms)`,
	`CREATE TABLE test_summaries (
		test_id UUID NOT NULL PRIMARY KEY,
		workshop_id UUID NOT NULL,
		readings INT NOT NULL,
		out_of_spec INT NOT NULL,
		cant_tell INT NOT NULL,
		ok INT NOT NULL,
		unresolved INT NOT NULL,
		range_known INT NOT NULL
	) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`,
	'ALTER TABLE conflicts ADD COLUMN settled_note VARCHAR(500) NULL AFTER settled_value'
];

const DOWN = [
	'ALTER TABLE conflicts DROP COLUMN settled_note',
	'DROP TABLE test_summaries',
	'ALTER TABLE tests DROP INDEX tests_overview',
	'ALTER TABLE tests DROP COLUMN relative_mode, DROP COLUMN lead_ohms, DROP COLUMN meter_name',
	'ALTER TABLE readings DROP COLUMN range_unresolved, DROP COLUMN server_verdict'
];

type Row = {
	id: string;
	range_label: string | null;
	check_key: string;
	meter: string | null;
	temperature: string | null;
	checks: string | null;
};

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
			const checks = r.checks ? parseNumbers<CheckSpec[]>(r.checks) : [];
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
	await fillTestSummaries(sequelize);
}

/** Summarise the readings stored so far per test (`ids`: only those tests). */
export async function fillTestSummaries(s: Sequelize, ids?: string[]) {
	await s.query(
		`INSERT INTO test_summaries (test_id, workshop_id, readings, out_of_spec, cant_tell, ok, unresolved, range_known)
		 SELECT test_id, MIN(workshop_id), COUNT(*), SUM(server_verdict IN ('low', 'high')),
			SUM(server_verdict IN ('borderline', 'depends')), SUM(server_verdict = 'within'),
			COALESCE(SUM(range_unresolved), 0), COUNT(range_unresolved)
		 FROM readings ${ids ? 'WHERE test_id IN (?)' : ''} GROUP BY test_id`,
		{ replacements: ids ? [ids] : [], type: QueryTypes.INSERT }
	);
}

export async function down({ sequelize }: MigrationContext): Promise<void> {
	for (const sql of DOWN) await raw(sequelize, sql);
}
