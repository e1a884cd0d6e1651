/** Test databases on the private MariaDB: a fresh one per runner, never the demo's. */
import {
	dbEnv,
	dropDatabase,
	ensureDatabase,
	startServer,
	stopServer
} from '../../scripts/lib/mariadb';

/** Start (or reuse) the server and make an empty database `name`. */
export async function freshDatabase(name: string) {
	const { port, started } = await startServer();
	dropDatabase(name);
	ensureDatabase(name);
	return { env: dbEnv(port, name), started };
}

/** Stop the server only when this runner started it. */
export async function stopIfStarted(started: boolean) {
	if (started && !process.env.FIELDBENCH_KEEP_DB) await stopServer();
}
