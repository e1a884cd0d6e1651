/**
 * The backbone every feature writes through: workshops, users, sessions, sign-in throttle,
 * the audit log, the change feed with its per-workshop counter row, and the sync operation
 * ledger. Ids are UUIDv7 in MariaDB's native UUID column; times are UTC DATETIME(3).
 */
import { QueryTypes } from 'sequelize';
import type { MigrationContext } from '../src/lib/server/db/migrator';

const TABLES: [string, string][] = [
	[
		'workshops',
		`id UUID NOT NULL PRIMARY KEY,
		name VARCHAR(120) NOT NULL,
		created_at DATETIME(3) NOT NULL,
		updated_at DATETIME(3) NOT NULL`
	],
	[
		'users',
		`id UUID NOT NULL PRIMARY KEY,
		workshop_id UUID NOT NULL,
		email VARCHAR(254) NOT NULL,
		name VARCHAR(120) NOT NULL,
		role ENUM('apprentice','technician','lead','owner') NOT NULL,
		password_hash VARCHAR(255) NOT NULL,
		active TINYINT(1) NOT NULL DEFAULT 1,
		version INT NOT NULL DEFAULT 1,
		created_at DATETIME(3) NOT NULL,
		updated_at DATETIME(3) NOT NULL,
		UNIQUE KEY users_email (email),
		KEY users_workshop (workshop_id),
		CONSTRAINT users_workshop_fk FOREIGN KEY (workshop_id) REFERENCES workshops(id)`
	],
	[
		'sessions',
		`id VARCHAR(64) NOT NULL PRIMARY KEY,
		user_id UUID NOT NULL,
		expires_at DATETIME(3) NOT NULL,
		created_at DATETIME(3) NOT NULL,
		KEY sessions_user (user_id),
		CONSTRAINT sessions_user_fk FOREIGN KEY (user_id) REFERENCES users(id) ON DELETE CASCADE`
	],
	[
		'sign_in_throttle',
		`bucket VARCHAR(300) NOT NULL PRIMARY KEY,
		failures INT NOT NULL DEFAULT 0,
		window_start DATETIME(3) NOT NULL,
		blocked_until DATETIME(3) NULL`
	],
	[
		'audit_log',
		`id BIGINT NOT NULL AUTO_INCREMENT PRIMARY KEY,
		workshop_id UUID NOT NULL,
		user_id UUID NULL,
		device_id VARCHAR(64) NULL,
		op_id UUID NULL,
		at DATETIME(3) NOT NULL,
		entity VARCHAR(40) NOT NULL,
		entity_id UUID NOT NULL,
		action VARCHAR(20) NOT NULL,
		field VARCHAR(64) NULL,
		old_value LONGTEXT NULL,
		new_value LONGTEXT NULL,
		KEY audit_entity (entity, entity_id),
		KEY audit_workshop_at (workshop_id, at)`
	],
	[
		'change_counters',
		`workshop_id UUID NOT NULL PRIMARY KEY,
		last_seq BIGINT NOT NULL DEFAULT 0`
	],
	[
		'changes',
		`workshop_id UUID NOT NULL,
		seq BIGINT NOT NULL,
		entity VARCHAR(40) NOT NULL,
		entity_id UUID NOT NULL,
		version INT NOT NULL,
		op ENUM('upsert','delete','evict') NOT NULL,
		job_id UUID NULL,
		audience UUID NULL,
		record LONGTEXT NULL,
		at DATETIME(3) NOT NULL,
		PRIMARY KEY (workshop_id, seq),
		KEY changes_entity (entity, entity_id)`
	],
	[
		'sync_ops',
		`op_id UUID NOT NULL PRIMARY KEY,
		workshop_id UUID NOT NULL,
		user_id UUID NOT NULL,
		device_id VARCHAR(64) NOT NULL,
		entity VARCHAR(40) NOT NULL,
		entity_id UUID NOT NULL,
		result TEXT NOT NULL,
		at DATETIME(3) NOT NULL`
	],
	[
		'customers',
		`id UUID NOT NULL PRIMARY KEY,
		workshop_id UUID NOT NULL,
		name VARCHAR(120) NOT NULL,
		phone VARCHAR(40) NULL,
		email VARCHAR(254) NULL,
		report_consent TINYINT(1) NOT NULL DEFAULT 0,
		version INT NOT NULL DEFAULT 1,
		field_versions TEXT NOT NULL,
		deleted_at DATETIME(3) NULL,
		created_by UUID NULL,
		updated_by UUID NULL,
		device_id VARCHAR(64) NULL,
		device_time DATETIME(3) NULL,
		created_at DATETIME(3) NOT NULL,
		updated_at DATETIME(3) NOT NULL,
		KEY customers_workshop_name (workshop_id, name),
		CONSTRAINT customers_workshop_fk FOREIGN KEY (workshop_id) REFERENCES workshops(id)`
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
