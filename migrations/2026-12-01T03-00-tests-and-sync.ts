/**
 * Tests and what hangs off them (readings, spark tests, swap tests, sign-offs), the sync
 * merge state per record, and the lead's conflicts. Readings are append-only and carry
 * their own op id and change-feed seq, so a reading costs one row.
 */
import { QueryTypes } from 'sequelize';
import type { MigrationContext } from '../src/lib/server/db/migrator';

const SYNC_COLUMNS = `version INT NOT NULL DEFAULT 1,
		field_versions TEXT NOT NULL,
		deleted_at DATETIME(3) NULL,
		created_by UUID NULL,
		updated_by UUID NULL,
		device_id VARCHAR(64) NULL,
		device_time DATETIME(3) NULL,
		created_at DATETIME(3) NOT NULL,
		updated_at DATETIME(3) NOT NULL`;

/** Columns of every append-only record: who, which device, when, and its feed position. */
const APPEND_COLUMNS = `id UUID NOT NULL PRIMARY KEY,
		workshop_id UUID NOT NULL,
		job_id UUID NOT NULL,
		op_id UUID NOT NULL,
		seq BIGINT NOT NULL,
		created_by UUID NOT NULL,
		device_id VARCHAR(64) NOT NULL,
		device_time DATETIME(3) NULL,
		created_at DATETIME(3) NOT NULL,
		UNIQUE KEY __T___op (op_id),
		UNIQUE KEY __T___seq (workshop_id, seq),
		KEY __T___job (job_id)`;

const append = (t: string, body: string) => `${APPEND_COLUMNS.replaceAll('__T__', t)},\n${body}`;

const TABLES: [string, string][] = [
	[
		'tests',
		`id UUID NOT NULL PRIMARY KEY,
		workshop_id UUID NOT NULL,
		job_id UUID NOT NULL,
		component_id UUID NULL,
		sheet_id UUID NULL,
		sheet_version INT NULL,
		part_number VARCHAR(60) NULL,
		position VARCHAR(20) NULL,
		technician_id UUID NULL,
		meter TEXT NULL,
		temperature TEXT NULL,
		state ENUM('in_progress','done','abandoned') NOT NULL DEFAULT 'in_progress',
		notes TEXT NULL,
		${SYNC_COLUMNS},
		KEY tests_job (job_id)`
	],
	[
		'readings',
		append(
			'readings',
			`test_id UUID NOT NULL,
		check_key VARCHAR(40) NOT NULL,
		position VARCHAR(20) NULL,
		samples TEXT NOT NULL,
		range_label VARCHAR(30) NULL,
		device_result TEXT NULL,
		server_result TEXT NULL,
		mismatch TINYINT(1) NOT NULL DEFAULT 0,
		KEY readings_test (test_id)`
		)
	],
	[
		'spark_tests',
		append(
			'spark_tests',
			`test_id UUID NULL,
		position VARCHAR(20) NOT NULL,
		gap_mm DECIMAL(5,2) NOT NULL,
		outcome ENUM('go','weak','none') NOT NULL,
		note VARCHAR(500) NULL`
		)
	],
	[
		'swap_tests',
		append(
			'swap_tests',
			`test_id UUID NULL,
		from_position VARCHAR(20) NOT NULL,
		to_position VARCHAR(20) NOT NULL,
		before_counts TEXT NOT NULL,
		after_counts TEXT NOT NULL,
		conclusion ENUM('fault_followed','fault_stayed','inconclusive') NOT NULL,
		note VARCHAR(500) NULL`
		)
	],
	[
		'signoffs',
		append(
			'signoffs',
			`test_id UUID NOT NULL,
		mode ENUM('witnessed','remote') NOT NULL,
		note VARCHAR(500) NULL`
		)
	],
	[
		'sync_devices',
		`device_id VARCHAR(64) NOT NULL,
		workshop_id UUID NOT NULL,
		user_id UUID NOT NULL,
		last_push_at DATETIME(3) NOT NULL,
		PRIMARY KEY (workshop_id, device_id)`
	],
	[
		'record_meta',
		`entity VARCHAR(40) NOT NULL,
		entity_id UUID NOT NULL,
		workshop_id UUID NOT NULL,
		field_writers LONGTEXT NOT NULL,
		PRIMARY KEY (entity, entity_id)`
	],
	[
		'conflicts',
		`id UUID NOT NULL PRIMARY KEY,
		workshop_id UUID NOT NULL,
		entity VARCHAR(40) NOT NULL,
		entity_id UUID NOT NULL,
		field VARCHAR(64) NOT NULL,
		status ENUM('open','agreed','settled') NOT NULL,
		server_value LONGTEXT NULL,
		server_writers TEXT NOT NULL,
		candidates LONGTEXT NOT NULL,
		settled_by UUID NULL,
		settled_at DATETIME(3) NULL,
		settled_value LONGTEXT NULL,
		created_at DATETIME(3) NOT NULL,
		updated_at DATETIME(3) NOT NULL,
		open_key TINYINT AS (IF(status = 'open', 1, NULL)) PERSISTENT,
		UNIQUE KEY conflicts_one_open (entity_id, field, open_key),
		KEY conflicts_workshop_status (workshop_id, status)`
	],
	[
		'reading_mismatches',
		`reading_id UUID NOT NULL PRIMARY KEY,
		workshop_id UUID NOT NULL,
		device_verdict VARCHAR(20) NULL,
		server_verdict VARCHAR(20) NULL,
		seen_by UUID NULL,
		created_at DATETIME(3) NOT NULL,
		KEY mismatches_workshop (workshop_id)`
	]
];

export async function up({ sequelize }: MigrationContext): Promise<void> {
	for (const [name, body] of TABLES) {
		await sequelize.query(
			`CREATE TABLE ${name} (${body}) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`,
			{ type: QueryTypes.RAW }
		);
	}
	// The ledger answers "seen before?" for mutable ops; its result is stored as JSON text.
	await sequelize.query('ALTER TABLE sync_ops ADD KEY sync_ops_workshop (workshop_id, at)', {
		type: QueryTypes.RAW
	});
}

export async function down({ sequelize }: MigrationContext): Promise<void> {
	await sequelize.query('ALTER TABLE sync_ops DROP KEY sync_ops_workshop', { type: QueryTypes.RAW });
	for (const [name] of [...TABLES].reverse()) {
		await sequelize.query(`DROP TABLE IF EXISTS ${name}`, { type: QueryTypes.RAW });
	}
}
