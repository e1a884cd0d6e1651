/**
 * The workshop's own records: vehicles, jobs, components and spec sheets. Each mutable
 * record carries the sync columns: version, per-field versions, tombstone, writer, device.
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

const TABLES: [string, string][] = [
	[
		'vehicles',
		`id UUID NOT NULL PRIMARY KEY,
		workshop_id UUID NOT NULL,
		customer_id UUID NULL,
		vin VARCHAR(17) NULL,
		chassis_no VARCHAR(40) NULL,
		chassis_reason VARCHAR(200) NULL,
		plate VARCHAR(20) NULL,
		make VARCHAR(60) NOT NULL,
		model VARCHAR(60) NOT NULL,
		year SMALLINT NULL,
		engine_code VARCHAR(30) NULL,
		odometer INT NULL,
		odometer_unit ENUM('km','mi') NOT NULL DEFAULT 'km',
		hybrid TINYINT(1) NOT NULL DEFAULT 0,
		${SYNC_COLUMNS},
		KEY vehicles_workshop_vin (workshop_id, vin),
		KEY vehicles_workshop_plate (workshop_id, plate)`
	],
	[
		'jobs',
		`id UUID NOT NULL PRIMARY KEY,
		workshop_id UUID NOT NULL,
		number INT NOT NULL,
		customer_id UUID NULL,
		vehicle_id UUID NULL,
		complaint TEXT NOT NULL,
		location VARCHAR(200) NULL,
		assignee_id UUID NULL,
		status ENUM('open','testing','awaiting_authorisation','awaiting_parts','repaired','retested_ok','no_fault_found','closed') NOT NULL DEFAULT 'open',
		codes_before TEXT NULL,
		codes_after TEXT NULL,
		notes TEXT NULL,
		${SYNC_COLUMNS},
		UNIQUE KEY jobs_workshop_number (workshop_id, number),
		KEY jobs_workshop_assignee (workshop_id, assignee_id, status)`
	],
	[
		'components',
		`id UUID NOT NULL PRIMARY KEY,
		workshop_id UUID NOT NULL,
		part_number VARCHAR(60) NOT NULL,
		kind ENUM('ignition_coil','coil_pack','injector','crank_cam_sensor','relay','glow_plug','heater_element','other') NOT NULL,
		description VARCHAR(300) NULL,
		fitment TEXT NULL,
		cautions TEXT NULL,
		positions TEXT NULL,
		${SYNC_COLUMNS},
		UNIQUE KEY components_workshop_part (workshop_id, part_number)`
	],
	[
		'spec_sheets',
		`id UUID NOT NULL PRIMARY KEY,
		workshop_id UUID NOT NULL,
		component_id UUID NOT NULL,
		sheet_version INT NOT NULL,
		state ENUM('draft','approved') NOT NULL DEFAULT 'draft',
		checks LONGTEXT NOT NULL,
		source TEXT NULL,
		approved_by UUID NULL,
		approved_at DATETIME(3) NULL,
		${SYNC_COLUMNS},
		UNIQUE KEY spec_sheets_component_version (component_id, sheet_version),
		CONSTRAINT spec_sheets_component_fk FOREIGN KEY (component_id) REFERENCES components(id)`
	]
];

export async function up({ sequelize }: MigrationContext): Promise<void> {
	for (const [name, body] of TABLES) {
		await sequelize.query(
			`CREATE TABLE ${name} (${body}) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`,
			{ type: QueryTypes.RAW }
		);
	}
}

export async function down({ sequelize }: MigrationContext): Promise<void> {
	for (const [name] of [...TABLES].reverse()) {
		await sequelize.query(`DROP TABLE IF EXISTS ${name}`, { type: QueryTypes.RAW });
	}
}
