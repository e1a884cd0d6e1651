/**
 * `npm run db:start | db:stop | db:status` — the private MariaDB of this checkout;
 * `npm run db:backup` — a consistent dump of the database into .data/backups/ (dated);
 * `npm run db:restore FILE [--into NAME] [--replace]` — load a dump into a fresh database.
 */
import { backupDatabase, restoreDatabase } from './lib/backup';
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
} else if (cmd === 'backup' || cmd === 'restore') {
	const { started } = await startServer();
	try {
		if (cmd === 'backup') {
			const file = backupDatabase(DB_NAME);
			console.log(`Backed up ${DB_NAME} to ${file}`);
		} else {
			const args = process.argv.slice(3);
			const file = args.find((a) => !a.startsWith('--') && args[args.indexOf(a) - 1] !== '--into');
			const into = args.includes('--into') ? args[args.indexOf('--into') + 1] : DB_NAME;
			if (!file) throw new Error('usage: npm run db:restore FILE [--into NAME] [--replace]');
			const { tables } = restoreDatabase(file, into, { replace: args.includes('--replace') });
			console.log(`Restored ${tables} tables into ${into} from ${file}`);
		}
	} catch (e) {
		console.error((e as Error).message);
		process.exitCode = 1;
	} finally {
		if (started) await stopServer();
	}
} else {
	console.error('usage: tsx scripts/db.ts start|stop|status|backup|restore FILE [--into NAME] [--replace]');
	process.exit(2);
}
