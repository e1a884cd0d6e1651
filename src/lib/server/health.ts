/** Database and migration status for `GET /api/health` and the start page. */
import { QueryTypes } from 'sequelize';
import { db } from './db';
import { listMigrationFiles } from './db/migrator';

export type Health = {
	ok: boolean;
	db: 'up' | 'down';
	migrations: { applied: number; pending: string[] } | null;
};

export async function checkHealth(): Promise<Health> {
	try {
		const rows = await db().query<{ name: string }>('SELECT name FROM sequelize_meta', {
			type: QueryTypes.SELECT
		});
		const applied = new Set(rows.map((r) => r.name));
		const pending = listMigrationFiles()
			.map((f) => f.replace(/\.(ts|js)$/, ''))
			.filter((n) => !applied.has(n));
		return { ok: pending.length === 0, db: 'up', migrations: { applied: applied.size, pending } };
	} catch {
		return { ok: false, db: 'down', migrations: null };
	}
}
