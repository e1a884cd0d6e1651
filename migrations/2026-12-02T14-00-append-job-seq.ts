/**
 * The append-only tables added beside the scoped pull (photos, photo marks, circuit tests) get
 * the same `(job_id, seq)` index as readings, so the pull reads a caller's rows job by job in
 * feed order from an index, as it does for the others.
 */
import { QueryTypes, type Sequelize } from 'sequelize';
import type { MigrationContext } from '../src/lib/server/db/migrator';

const raw = (s: Sequelize, sql: string) => s.query(sql, { type: QueryTypes.RAW });
const TABLES = ['photos', 'photo_marks', 'circuit_tests'];

export async function up({ sequelize }: MigrationContext): Promise<void> {
	for (const t of TABLES) await raw(sequelize, `ALTER TABLE ${t} DROP KEY ${t}_job, ADD KEY ${t}_job_seq (job_id, seq)`);
}

export async function down({ sequelize }: MigrationContext): Promise<void> {
	for (const t of TABLES) await raw(sequelize, `ALTER TABLE ${t} DROP KEY ${t}_job_seq, ADD KEY ${t}_job (job_id)`);
}
