/**
 * Evidence photos.
 *
 * - photos: append-only (op id and feed seq on the row, like readings). The bytes live in
 *   S3-compatible storage under `object_key` (and a small JPEG under `thumb_key`), both
 *   unguessable and under the workshop's own prefix; the row is written only after the
 *   object is stored and checked. `purged_at` is the server's: when the cleanup job deleted
 *   the objects of a removed photo.
 * - photo_marks: append-only decisions about a photo — `removed` (a tombstone: the photo is
 *   hidden), `for_customer` / `not_for_customer` (whether the customer report shows it). The
 *   latest mark of each kind in feed order counts.
 */
import { QueryTypes, type Sequelize } from 'sequelize';
import type { MigrationContext } from '../src/lib/server/db/migrator';

const raw = (s: Sequelize, sql: string) => s.query(sql, { type: QueryTypes.RAW });

const appendColumns = (t: string) => `id UUID NOT NULL PRIMARY KEY,
		workshop_id UUID NOT NULL,
		job_id UUID NOT NULL,
		op_id UUID NOT NULL,
		seq BIGINT NOT NULL,
		created_by UUID NOT NULL,
		device_id VARCHAR(64) NOT NULL,
		device_time DATETIME(3) NULL,
		created_at DATETIME(3) NOT NULL,
		UNIQUE KEY ${t}_op (op_id),
		UNIQUE KEY ${t}_seq (workshop_id, seq),
		KEY ${t}_job (job_id)`;

const UP = [
	`CREATE TABLE photos (
		${appendColumns('photos')},
		test_id UUID NULL,
		reading_id UUID NULL,
		caption VARCHAR(200) NULL,
		content_type VARCHAR(20) NOT NULL,
		bytes INT NOT NULL,
		sha256 CHAR(64) NOT NULL,
		width INT NULL,
		height INT NULL,
		object_key VARCHAR(200) NOT NULL,
		thumb_key VARCHAR(200) NOT NULL,
		purged_at DATETIME(3) NULL
	) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`,
	`CREATE TABLE photo_marks (
		${appendColumns('photo_marks')},
		test_id UUID NULL,
		photo_id UUID NOT NULL,
		mark ENUM('removed','for_customer','not_for_customer') NOT NULL,
		KEY photo_marks_photo (photo_id, seq)
	) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`
];

const DOWN = ['DROP TABLE photo_marks', 'DROP TABLE photos'];

export async function up({ sequelize }: MigrationContext): Promise<void> {
	for (const sql of UP) await raw(sequelize, sql);
}

export async function down({ sequelize }: MigrationContext): Promise<void> {
	for (const sql of DOWN) await raw(sequelize, sql);
}
