/**
 * `npm start`: MariaDB (installed from Debian's packages when missing) on 127.0.0.1, the
 * migrations, the demo workshop, a build when the sources changed, then the app on
 * 127.0.0.1 (port 3000 or the next free one). The last line printed is the one address,
 * "Fieldbench is running at http://localhost:PORT"; http://127.0.0.1:PORT works as well.
 */
import { buildIfNeeded, freePort, migrate, serve } from './lib/app';
import { mailEnv, startMailServer, stopMailServer } from './lib/mail';
import { payEnv, startPayServer, stopPayServer } from './lib/pay';
import { dbEnv, ensureDatabase, startServer } from './lib/mariadb';
import { s3Env, startS3Server, stopS3Server } from './lib/s3';

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

// The local fake mail server catches every e-mail unless a real one is configured (SMTP_HOST).
const mail = process.env.SMTP_HOST ? null : await startMailServer();
if (mail) console.log(`Fake mail server on 127.0.0.1:${mail.port}: e-mail is saved in ${mail.dir}, nothing is sent`);

// The local fake photo store keeps photos under .data/s3/ unless a real one is configured (S3_BUCKET).
const store = process.env.S3_BUCKET ? null : await startS3Server();
if (store) console.log(`Fake photo store on 127.0.0.1:${store.port}: photos are kept in ${store.dir}`);

buildIfNeeded();
const wantedPort = Number(process.env.PORT ?? 3000);
const appPort = await freePort(wantedPort);
if (appPort !== wantedPort) console.log(`Port ${wantedPort} is taken; the app uses ${appPort}.`);
// The local fake payment provider takes card payments unless a real key is configured.
const pay = process.env.STRIPE_SECRET_KEY ? null : await startPayServer('fieldbench', `http://127.0.0.1:${appPort}/api/pay/webhook`);
if (pay) console.log(`Fake payment provider on 127.0.0.1:${pay.port}: test card 4242 4242 4242 4242 pays, 4000 0000 0000 0002 is declined`);
const { child, url } = await serve(appPort, {
	...dbEnv(dbPort, name),
	...(mail ? mailEnv(mail.port, mail.dir) : {}),
	...(pay ? payEnv(pay.url) : {}),
	...(store ? s3Env(store.port) : {})
});
// The address comes once, on the last line; the app processes print nothing.
console.log('Stop with Ctrl+C; stop the database with: npm run db:stop');
console.log(`\nFieldbench is running at ${url}`);

for (const sig of ['SIGINT', 'SIGTERM'] as const) {
	process.on(sig, async () => {
		if (child.pid) process.kill(-child.pid, sig);
		// All at once, so a terminal that ends this process soon after Ctrl+C leaves none running.
		await Promise.all([
			mail?.started ? stopMailServer() : null,
			pay?.started ? stopPayServer('fieldbench') : null,
			store?.started ? stopS3Server() : null
		]);
		process.exit(0);
	});
}
child.on('exit', (code) => process.exit(code ?? 0));
