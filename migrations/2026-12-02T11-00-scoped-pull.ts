/**
 * Sync at a workshop's scale: the pull reads only what its caller may see, from indexes.
 *
 * - jobs: `closed_at` — when the job last became Closed (NULL while open), kept by two
 *   triggers so every writer (services, seed, raw SQL) sets it; existing closed jobs take
 *   their last change. `jobs_window (workshop_id, status, closed_at)` finds the open jobs and
 *   those closed within a window.
 * - the append-only tables: `(job_id, seq)` replaces `(job_id)`, so a caller's rows are read
 *   job by job in feed order.
 * - changes: `(workshop_id, audience, seq)` (rows meant for one user), `(workshop_id, job_id,
 *   seq)` (rows of a job) and `(workshop_id, entity, seq)` (the library, customers, vehicles).
 * - change_counters: `floor_seq`, the last seq trimmed from `changes` (a cursor below it gets a
 *   snapshot).
 * - sync_settings: the windows of a workshop — how long a closed job stays on a technician's
 *   phone (`phone_days`) and on a lead's (`desk_days`).
 */
import { QueryTypes, type Sequelize } from 'sequelize';
import type { MigrationContext } from '../src/lib/server/db/migrator';

const raw = (s: Sequelize, sql: string) => s.query(sql, { type: QueryTypes.RAW });
const APPEND = ['readings', 'spark_tests', 'swap_tests', 'signoffs'];

const CLOSED_AT = `IF(NEW.status = 'closed', COALESCE(NEW.closed_at, UTC_TIMESTAMP(3)), NULL)`;

export async function up({ sequelize }: MigrationContext): Promise<void> {
	await raw(sequelize, 'ALTER TABLE jobs ADD COLUMN closed_at DATETIME(3) NULL, ADD KEY jobs_window (workshop_id, status, closed_at)');
	await raw(sequelize, "UPDATE jobs SET closed_at = updated_at WHERE status = 'closed'");
	await raw(sequelize, `CREATE TRIGGER jobs_closed_at_insert BEFORE INSERT ON jobs FOR EACH ROW SET NEW.closed_at = ${CLOSED_AT}`);
	await raw(
		sequelize,
		`CREATE TRIGGER jobs_closed_at_update BEFORE UPDATE ON jobs FOR EACH ROW
		 SET NEW.closed_at = IF(NEW.status = 'closed', IF(OLD.status = 'closed', COALESCE(NEW.closed_at, OLD.closed_at), UTC_TIMESTAMP(3)), NULL)`
	);
	for (const t of APPEND) await raw(sequelize, `ALTER TABLE ${t} DROP KEY ${t}_job, ADD KEY ${t}_job_seq (job_id, seq)`);
	await raw(
		sequelize,
		`ALTER TABLE changes ADD KEY changes_audience (workshop_id, audience, seq),
		 ADD KEY changes_job (workshop_id, job_id, seq), ADD KEY changes_entity_seq (workshop_id, entity, seq)`
	);
	await raw(sequelize, 'ALTER TABLE change_counters ADD COLUMN floor_seq BIGINT NOT NULL DEFAULT 0');
	await raw(
		sequelize,
		`CREATE TABLE sync_settings (
		workshop_id UUID NOT NULL PRIMARY KEY,
		phone_days SMALLINT NOT NULL DEFAULT 30,
		desk_days SMALLINT NOT NULL DEFAULT 30,
		updated_by UUID NULL,
		updated_at DATETIME(3) NOT NULL
		) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`
	);
}

export async function down({ sequelize }: MigrationContext): Promise<void> {
	await raw(sequelize, 'DROP TABLE IF EXISTS sync_settings');
	await raw(sequelize, 'ALTER TABLE change_counters DROP COLUMN floor_seq');
	await raw(sequelize, 'ALTER TABLE changes DROP KEY changes_audience, DROP KEY changes_job, DROP KEY changes_entity_seq');
	for (const t of APPEND) await raw(sequelize, `ALTER TABLE ${t} DROP KEY ${t}_job_seq, ADD KEY ${t}_job (job_id)`);
	await raw(sequelize, 'DROP TRIGGER IF EXISTS jobs_closed_at_update');
	await raw(sequelize, 'DROP TRIGGER IF EXISTS jobs_closed_at_insert');
	await raw(sequelize, 'ALTER TABLE jobs DROP KEY jobs_window, DROP COLUMN closed_at');
}
