/**
 * Circuit tests: battery, parasitic draw, voltage drop, charging, relay, crank or cam sensor.
 * Append-only like spark and swap tests (their own op id and feed seq per row): the kind, the
 * figures typed (limits included) as JSON, what the phone showed and the server's own
 * judgement of the same figures (`flow/circuit.ts`), and whether the two differ.
 *
 * Parts of the library gain two kinds, battery and alternator, for their sheets.
 */
import { QueryTypes } from 'sequelize';
import type { MigrationContext } from '../src/lib/server/db/migrator';

const UP = `CREATE TABLE circuit_tests (
		id UUID NOT NULL PRIMARY KEY,
		workshop_id UUID NOT NULL,
		job_id UUID NOT NULL,
		op_id UUID NOT NULL,
		seq BIGINT NOT NULL,
		created_by UUID NOT NULL,
		device_id VARCHAR(64) NOT NULL,
		device_time DATETIME(3) NULL,
		created_at DATETIME(3) NOT NULL,
		test_id UUID NULL,
		kind ENUM('battery','parasitic','drop','charging','relay','sensor') NOT NULL,
		inputs TEXT NOT NULL,
		device_result TEXT NULL,
		server_result TEXT NOT NULL,
		mismatch TINYINT(1) NOT NULL DEFAULT 0,
		server_verdict VARCHAR(20) NOT NULL,
		note VARCHAR(500) NULL,
		UNIQUE KEY circuit_tests_op (op_id),
		UNIQUE KEY circuit_tests_seq (workshop_id, seq),
		KEY circuit_tests_job (job_id)
	) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`;

const KINDS = `'ignition_coil','coil_pack','injector','crank_cam_sensor','relay','glow_plug','heater_element'`;

export async function up({ sequelize }: MigrationContext): Promise<void> {
	await sequelize.query(UP, { type: QueryTypes.RAW });
	await sequelize.query(`ALTER TABLE components MODIFY kind ENUM(${KINDS},'battery','alternator','other') NOT NULL`, { type: QueryTypes.RAW });
}

export async function down({ sequelize }: MigrationContext): Promise<void> {
	await sequelize.query(`UPDATE components SET kind = 'other' WHERE kind IN ('battery','alternator')`, { type: QueryTypes.RAW });
	await sequelize.query(`ALTER TABLE components MODIFY kind ENUM(${KINDS},'other') NOT NULL`, { type: QueryTypes.RAW });
	await sequelize.query('DROP TABLE IF EXISTS circuit_tests', { type: QueryTypes.RAW });
}
