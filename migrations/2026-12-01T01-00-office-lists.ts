/**
 * Indexes for the server-side lists of jobs and vehicles: a vehicle's history (jobs by
 * vehicle, newest first), a customer's jobs and vehicles, and the "opened from/until" filter.
 */
import { QueryTypes } from 'sequelize';
import type { MigrationContext } from '../src/lib/server/db/migrator';

const INDEXES: [table: string, name: string, columns: string][] = [
	['jobs', 'jobs_workshop_vehicle', 'workshop_id, vehicle_id, created_at'],
	['jobs', 'jobs_workshop_customer', 'workshop_id, customer_id'],
	['jobs', 'jobs_workshop_created', 'workshop_id, created_at'],
	['vehicles', 'vehicles_workshop_customer', 'workshop_id, customer_id']
];

export async function up({ sequelize }: MigrationContext): Promise<void> {
	for (const [table, name, columns] of INDEXES) {
		await sequelize.query(`CREATE INDEX ${name} ON ${table} (${columns})`, {
			type: QueryTypes.RAW
		});
	}
}

export async function down({ sequelize }: MigrationContext): Promise<void> {
	for (const [table, name] of [...INDEXES].reverse()) {
		await sequelize.query(`ALTER TABLE ${table} DROP INDEX ${name}`, { type: QueryTypes.RAW });
	}
}
