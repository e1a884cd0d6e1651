/**
 * What the benches share to get going: the private MariaDB (started when it is not running,
 * durable commits as `npm start` has them), a database of their own made afresh and migrated,
 * and stopping what they started when they end or are interrupted.
 */
import type { ChildProcess } from 'node:child_process';
import { migrate, stopServe } from '../../scripts/lib/app';
import { dbEnv, dropDatabase, ensureDatabase, startServer, stopServer } from '../../scripts/lib/mariadb';

/**
 * The private MariaDB, started when it is not running. `stop` stops it again only when this
 * run started it, and not when FIELDBENCH_KEEP_DB is set.
 */
export async function benchMariaDb() {
	const { port, started } = await startServer();
	const stop = async () => {
		if (started && !process.env.FIELDBENCH_KEEP_DB) await stopServer();
	};
	return { port, started, stop };
}

/** Interrupted (Ctrl+C, SIGTERM): stop the app servers in `apps` (their own process groups), then MariaDB as `db.stop` does; exit 130. */
export function stopOnInterrupt(apps: ChildProcess[], db: { stop: () => Promise<void> }): void {
	for (const signal of ['SIGINT', 'SIGTERM'] as const) {
		process.once(signal, () => {
			for (const a of apps) stopServe(a);
			const done = () => process.exit(130);
			db.stop().then(done, done);
		});
	}
}

/** Database `name` on the server at `port`, dropped and made afresh, migrated; its environment set on this process and returned. */
export async function freshBenchDatabase(port: number, name: string): Promise<Record<string, string>> {
	dropDatabase(name);
	ensureDatabase(name);
	const env = dbEnv(port, name);
	Object.assign(process.env, env);
	await migrate();
	return env;
}
