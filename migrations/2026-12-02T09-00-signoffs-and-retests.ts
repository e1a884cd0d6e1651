/**
 * Sign-offs of apprentice work and re-tests after a repair.
 *
 * - tests: `needs_signoff` (1 when an apprentice started the test: the server sets it from
 *   the session, it never comes from a client), `retest_of` (the first test of the same part
 *   and positions that this one re-tests after the repair). Existing tests of apprentices are
 *   marked here. The overview's covering index gains `needs_signoff`, so the waiting count
 *   per person is still read from the index alone; `tests_signoff` finds a workshop's
 *   apprentice tests for the desk's sign-off list and its count in the navigation.
 * - signoffs: `decision` — `signed`, or `sent_back` with a note for the apprentice — and an
 *   index by test in feed order (the latest decision of a test is the one that counts).
 * - test_summaries: the latest decision of each test (`signoff`) and whether readings came in
 *   after it (`revised`), kept by the same statements that add readings and sign-offs; the
 *   overview counts the tests waiting for a sign-off from them. Filled here from the stored
 *   sign-offs and readings.
 */
import { QueryTypes, type Sequelize } from 'sequelize';
import type { MigrationContext } from '../src/lib/server/db/migrator';

const raw = (s: Sequelize, sql: string) => s.query(sql, { type: QueryTypes.RAW });

const OVERVIEW_INDEX =
	'workshop_id, created_at, deleted_at, state, part_number, technician_id, meter_name, relative_mode, lead_ohms';

const UP = [
	`ALTER TABLE tests
		ADD COLUMN needs_signoff TINYINT(1) NOT NULL DEFAULT 0 AFTER technician_id,
		ADD COLUMN retest_of UUID NULL AFTER needs_signoff,
		ADD KEY tests_retest_of (retest_of),
		ADD KEY tests_signoff (workshop_id, needs_signoff, state, deleted_at)`,
	`UPDATE tests t JOIN users u ON u.id = t.technician_id SET t.needs_signoff = 1 WHERE u.role = 'apprentice'`,
	'ALTER TABLE tests DROP INDEX tests_overview',
	`CREATE INDEX tests_overview ON tests (${OVERVIEW_INDEX}, needs_signoff)`,
	`ALTER TABLE signoffs
		ADD COLUMN decision ENUM('signed','sent_back') NOT NULL DEFAULT 'signed' AFTER mode,
		ADD KEY signoffs_test (test_id, seq)`,
	`ALTER TABLE test_summaries
		ADD COLUMN signoff ENUM('signed','sent_back') NULL,
		ADD COLUMN revised TINYINT(1) NOT NULL DEFAULT 0`,
	// The latest decision per test, and whether a reading arrived after it (feed order).
	`INSERT INTO test_summaries (test_id, workshop_id, readings, out_of_spec, cant_tell, ok, unresolved, range_known, signoff, revised)
	 SELECT s.test_id, s.workshop_id, 0, 0, 0, 0, 0, 0, s.decision,
		EXISTS (SELECT 1 FROM readings r WHERE r.test_id = s.test_id AND r.seq > s.seq)
	 FROM signoffs s
	 WHERE s.seq = (SELECT MAX(s2.seq) FROM signoffs s2 WHERE s2.test_id = s.test_id)
	 ON DUPLICATE KEY UPDATE signoff = VALUES(signoff), revised = VALUES(revised)`
];

const DOWN = [
	'ALTER TABLE test_summaries DROP COLUMN revised, DROP COLUMN signoff',
	'ALTER TABLE signoffs DROP INDEX signoffs_test, DROP COLUMN decision',
	'ALTER TABLE tests DROP INDEX tests_overview',
	`CREATE INDEX tests_overview ON tests (${OVERVIEW_INDEX})`,
	'ALTER TABLE tests DROP INDEX tests_signoff, DROP INDEX tests_retest_of, DROP COLUMN retest_of, DROP COLUMN needs_signoff'
];

export async function up({ sequelize }: MigrationContext): Promise<void> {
	for (const sql of UP) await raw(sequelize, sql);
}

export async function down({ sequelize }: MigrationContext): Promise<void> {
	for (const sql of DOWN) await raw(sequelize, sql);
}
