/**
 * umzug over the files in migrations/ (dated names, `up` and `down`), with the applied list
 * kept in the `SequelizeMeta` table. Used by `npm start`, `npm run migrate` and the tests.
 */
import { readdirSync } from 'node:fs';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import type { QueryInterface, Sequelize } from 'sequelize';
import { SequelizeStorage, Umzug } from 'umzug';

export type MigrationContext = { queryInterface: QueryInterface; sequelize: Sequelize };
type MigrationModule = {
	up: (ctx: MigrationContext) => Promise<void>;
	down: (ctx: MigrationContext) => Promise<void>;
};

/** The migrations folder: MIGRATIONS_DIR, or ./migrations under the working directory. */
export function migrationsDir(): string {
	return process.env.MIGRATIONS_DIR ?? path.resolve(process.cwd(), 'migrations');
}

/** Names of the migration files on disk, in order. */
export function listMigrationFiles(): string[] {
	return readdirSync(migrationsDir())
		.filter((f) => /^\d{4}-\d{2}-\d{2}.*\.(ts|js)$/.test(f) && !f.endsWith('.d.ts'))
		.sort();
}

export function createMigrator(sequelize: Sequelize) {
	const dir = migrationsDir();
	return new Umzug<MigrationContext>({
		migrations: listMigrationFiles().map((file) => ({
			name: file.replace(/\.(ts|js)$/, ''),
			up: async ({ context }) =>
				((await import(pathToFileURL(path.join(dir, file)).href)) as MigrationModule).up(context),
			down: async ({ context }) =>
				((await import(pathToFileURL(path.join(dir, file)).href)) as MigrationModule).down(context)
		})),
		context: { queryInterface: sequelize.getQueryInterface(), sequelize },
		storage: new SequelizeStorage({ sequelize }),
		logger: undefined
	});
}
