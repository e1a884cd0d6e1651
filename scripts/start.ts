/**
 * `npm start`: MariaDB (installed from Debian's packages when missing) on 127.0.0.1, the
 * migrations, the demo workshop, a build when the sources changed, then the app on
 * 127.0.0.1 with ORIGIN set to the URL printed at the end.
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
const appPort = await freePort(Number(process.env.PORT ?? 3000));
const { child, url } = await serve(appPort, dbEnv(dbPort, name));
console.log(
	`\nFieldbench is running at ${url}\n(stop with Ctrl+C; stop the database with: npm run db:stop)\n`
);

for (const sig of ['SIGINT', 'SIGTERM'] as const) {
	process.on(sig, () => {
		if (child.pid) process.kill(-child.pid, sig);
		process.exit(0);
	});
}
child.on('exit', (code) => process.exit(code ?? 0));
