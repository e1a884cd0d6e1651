/**
 * Circuit tests take part in sign-offs and the lead's overview like coil tests:
 * - `needs_signoff`: the test was saved by an apprentice, so it waits for a lead's sign-off
 *   (set by the server from the session, never from the phone); filled here from the roles
 *   of the people who saved the stored ones.
 * - `circuit_tests_overview` (workshop, created_at): the overview's range over circuit tests;
 *   `circuit_tests_signoff` (workshop, needs_signoff): the desk's sign-off list and its count.
 * A sign-off decision on a circuit test is an ordinary `signoffs` row whose `test_id` is the
 * circuit test's id (ids are UUIDv7, unique across tables).
 */
import { QueryTypes } from 'sequelize';
import type { MigrationContext } from '../src/lib/server/db/migrator';

export async function up({ sequelize }: MigrationContext): Promise<void> {
	await sequelize.query(
		`ALTER TABLE circuit_tests
			ADD COLUMN needs_signoff TINYINT(1) NOT NULL DEFAULT 0 AFTER created_by,
			ADD KEY circuit_tests_overview (workshop_id, created_at),
			ADD KEY circuit_tests_signoff (workshop_id, needs_signoff)`,
		{ type: QueryTypes.RAW }
	);
	await sequelize.query(
		`UPDATE circuit_tests c JOIN users u ON u.id = c.created_by SET c.needs_signoff = 1 WHERE u.role = 'apprentice'`,
		{ type: QueryTypes.RAW }
	);
}

export async function down({ sequelize }: MigrationContext): Promise<void> {
	await sequelize.query(
		'ALTER TABLE circuit_tests DROP INDEX circuit_tests_signoff, DROP INDEX circuit_tests_overview, DROP COLUMN needs_signoff',
		{
			type: QueryTypes.RAW
		}
	);
}
