/** `npm run db:start | db:stop | db:status` — the private MariaDB of this checkout. */
import { dbEnv, ensureDatabase, runningPort, startServer, stopServer } from './lib/mariadb';

const DB_NAME = process.env.DB_NAME ?? 'fieldbench';
const cmd = process.argv[2];

if (cmd === 'start') {
	const { port, started } = await startServer();
	ensureDatabase(DB_NAME);
	console.log(`MariaDB ${started ? 'started' : 'already running'} on 127.0.0.1:${port}`);
	console.log(
		Object.entries(dbEnv(port, DB_NAME))
			.map(([k, v]) => `${k}=${v}`)
			.join(' ')
	);
} else if (cmd === 'stop') {
	console.log((await stopServer()) ? 'MariaDB stopped.' : 'MariaDB was not running.');
} else if (cmd === 'status') {
	const port = runningPort();
	console.log(port ? `MariaDB running on 127.0.0.1:${port}` : 'MariaDB is not running.');
} else {
	console.error('usage: tsx scripts/db.ts start|stop|status');
	process.exit(2);
}
