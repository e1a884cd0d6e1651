/**
 * Each workshop's time zone (an IANA name such as `Europe/London`): the office pages, the
 * customer's report and the mails show times in it. Workshops already there take the
 * server's own zone (`TZ`, else the runtime's default), as a new workshop does; `UTC` when
 * that is not a known name, which is what every page showed before.
 */
import { QueryTypes } from 'sequelize';
import type { MigrationContext } from '../src/lib/server/db/migrator';
import { defaultTimeZone } from '../src/lib/zoned-time';

export async function up({ sequelize }: MigrationContext): Promise<void> {
	await sequelize.query(
		`ALTER TABLE workshops ADD COLUMN time_zone VARCHAR(64) NOT NULL DEFAULT 'UTC' AFTER name`,
		{ type: QueryTypes.RAW }
	);
	await sequelize.query('UPDATE workshops SET time_zone = ?', {
		replacements: [defaultTimeZone()],
		type: QueryTypes.UPDATE
	});
}

export async function down({ sequelize }: MigrationContext): Promise<void> {
	await sequelize.query('ALTER TABLE workshops DROP COLUMN time_zone', { type: QueryTypes.RAW });
}
