import { QueryTypes } from 'sequelize';
import { describe, expect, it } from 'vitest';
import { db } from '../../src/lib/server/db';
import { createMigrator, listMigrationFiles } from '../../src/lib/server/db/migrator';

async function tables(): Promise<string[]> {
	const rows = await db().query<{ t: string }>(
		'SELECT table_name AS t FROM information_schema.tables WHERE table_schema = DATABASE()',
		{ type: QueryTypes.SELECT }
	);
	return rows
		.map((r) => r.t)
		.filter((t) => t !== 'sequelize_meta')
		.sort();
}

describe('migrations', () => {
	it('go down to nothing and up again to the same schema', async () => {
		const migrator = createMigrator(db());
		const before = await tables();
		expect(before).toContain('changes');
		expect(before).toContain('customers');

		await migrator.down({ to: 0 });
		expect(await tables()).toEqual([]);
		expect(await migrator.executed()).toHaveLength(0);

		await migrator.up();
		expect(await tables()).toEqual(before);
		expect((await migrator.executed()).length).toBe(listMigrationFiles().length);
	});

	it('store ids in the native UUID column type', async () => {
		const rows = await db().query<{ t: string }>(
			`SELECT data_type AS t FROM information_schema.columns
			 WHERE table_schema = DATABASE() AND table_name = 'customers' AND column_name = 'id'`,
			{ type: QueryTypes.SELECT }
		);
		expect(rows[0].t.toLowerCase()).toBe('uuid');
	});
});
