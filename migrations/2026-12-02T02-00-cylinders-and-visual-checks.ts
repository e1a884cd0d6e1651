/**
 * The vehicle's cylinder count (the spark and swap tests offer that many cylinders), and a
 * visual check's finding on a reading (OK or not, with a note; such a reading has no samples).
 */
import { QueryTypes } from 'sequelize';
import type { MigrationContext } from '../src/lib/server/db/migrator';

export async function up({ sequelize }: MigrationContext): Promise<void> {
	await sequelize.query('ALTER TABLE vehicles ADD COLUMN cylinders TINYINT UNSIGNED NULL AFTER engine_code', {
		type: QueryTypes.RAW
	});
	await sequelize.query('ALTER TABLE readings ADD COLUMN visual TEXT NULL AFTER samples', { type: QueryTypes.RAW });
}

export async function down({ sequelize }: MigrationContext): Promise<void> {
	await sequelize.query('ALTER TABLE readings DROP COLUMN visual', { type: QueryTypes.RAW });
	await sequelize.query('ALTER TABLE vehicles DROP COLUMN cylinders', { type: QueryTypes.RAW });
}
