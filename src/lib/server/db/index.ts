/**
 * The one Sequelize instance (dialect `mariadb`). Connection settings come from the
 * environment (DB_HOST, DB_PORT, DB_NAME, DB_USER, DB_PASSWORD), set by the start and test
 * scripts. All timestamps are UTC.
 */
import { Sequelize } from 'sequelize';
import { initModels } from './models';

let instance: Sequelize | null = null;

/** Settings read from the environment, with the private server's defaults. */
export function dbConfig() {
	return {
		host: process.env.DB_HOST ?? '127.0.0.1',
		port: Number(process.env.DB_PORT ?? 3307),
		database: process.env.DB_NAME ?? 'fieldbench',
		username: process.env.DB_USER ?? 'fieldbench',
		password: process.env.DB_PASSWORD ?? 'fieldbench-local-only'
	};
}

/** The shared instance, created (with every model registered) on first use. */
export function db(): Sequelize {
	if (instance) return instance;
	const c = dbConfig();
	instance = new Sequelize(c.database, c.username, c.password, {
		host: c.host,
		port: c.port,
		dialect: 'mariadb',
		logging: false,
		timezone: '+00:00',
		dialectOptions: { connectTimeout: 5000 },
		pool: { max: Number(process.env.DB_POOL ?? 10), min: 0, idle: 10_000, acquire: 30_000 },
		define: { underscored: true, timestamps: true }
	});
	initModels(instance);
	return instance;
}

/** Close the pool (scripts and tests call this at the end). */
export async function closeDb(): Promise<void> {
	if (!instance) return;
	const s = instance;
	instance = null;
	await s.close();
}
