/**
 * Test databases on the private MariaDB: a fresh one per runner and per process (so two
 * runs on one machine never share one), never the demo's; dropped again at the end.
 */
import { dbEnv, dropDatabase, ensureDatabase, startServer, stopServer } from '../../scripts/lib/mariadb';

/** Start (or reuse) the server and make an empty database named `<prefix>_<pid>`. */
export async function freshDatabase(prefix: string) {
	const name = `${prefix}_${process.pid}`;
	const { port, started } = await startServer();
	dropDatabase(name);
	ensureDatabase(name);
	return { env: dbEnv(port, name), started, name };
}

/** Drop the runner's database, and stop the server only when this runner started it. */
export async function finish(db: { name: string; started: boolean } | null) {
	if (!db) return;
	try {
		dropDatabase(db.name);
	} catch {
		/* the server may already be gone */
	}
	if (db.started && !process.env.FIELDBENCH_KEEP_DB) await stopServer();
}
