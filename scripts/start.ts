/**
 * `npm start`: MariaDB (installed from Debian's packages when missing) on 127.0.0.1, the
 * migrations, the demo workshop, a build when the sources changed, then the app on
 * 127.0.0.1 (port 3000 or the next free one). The last line printed is the one address,
 * "Fieldbench is running at http://localhost:PORT"; http://127.0.0.1:PORT works as well.
 */
import { buildIfNeeded, freePort, migrate, serve } from './lib/app';
import { dbEnv, ensureDatabase, startServer } from './lib/mariadb';

const name = process.env.DB_NAME ?? 'fieldbench';
const { port: dbPort, started } = await startServer();
ensureDatabase(name);
console.log(
	`MariaDB ${started ? 'started' : 'already running'} on 127.0.0.1:${dbPort} (database ${name})`
);
Object.assign(process.env, dbEnv(dbPort, name));

console.log(`Migrations: ${await migrate()} applied.`);
const { seedDemo } = await import('../src/lib/server/seed/demo');
const { closeDb } = await import('../src/lib/server/db');
const made = await seedDemo();
await closeDb();
console.log(made ? `Demo workshop: ${made} record(s) created.` : 'Demo workshop: present.');

buildIfNeeded();
const wantedPort = Number(process.env.PORT ?? 3000);
const appPort = await freePort(wantedPort);
if (appPort !== wantedPort) console.log(`Port ${wantedPort} is taken; the app uses ${appPort}.`);
const { child, url } = await serve(appPort, dbEnv(dbPort, name));
// The address comes once, on the last line; the app processes print nothing.
console.log('Stop with Ctrl+C; stop the database with: npm run db:stop');
console.log(`\nFieldbench is running at ${url}`);

for (const sig of ['SIGINT', 'SIGTERM'] as const) {
	process.on(sig, () => {
		if (child.pid) process.kill(-child.pid, sig);
		process.exit(0);
	});
}
child.on('exit', (code) => process.exit(code ?? 0));
