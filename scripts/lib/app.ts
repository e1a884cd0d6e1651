/** Shared by the start script and the end-to-end tests: migrate, build and serve. */
import { spawn, spawnSync, type ChildProcess, type StdioOptions } from 'node:child_process';
import { existsSync, readdirSync, statSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import net from 'node:net';
import { portFree, ROOT } from './mariadb';

/** Whether nothing listens on `port` at [::1] (true when this machine has no IPv6 loopback). */
function ipv6LoopbackFree(port: number): Promise<boolean> {
	return new Promise((resolve) => {
		const srv = net.createServer();
		srv.once('error', (e: NodeJS.ErrnoException) =>
			resolve(e.code === 'EADDRNOTAVAIL' || e.code === 'EAFNOSUPPORT')
		);
		srv.listen({ port, host: '::1', ipv6Only: true }, () => srv.close(() => resolve(true)));
	});
}

/**
 * The first port from `from` upwards that is free at 127.0.0.1 and at [::1]: the app listens
 * on 127.0.0.1, and a browser may try [::1] first for "localhost", where another program
 * could otherwise answer.
 */
export async function freePort(from: number): Promise<number> {
	let port = from;
	while (!((await portFree(port)) && (await ipv6LoopbackFree(port)))) port++;
	return port;
}

/** Apply pending migrations to the database named in the environment. */
export async function migrate(): Promise<number> {
	const { db, closeDb } = await import('../../src/lib/server/db');
	const { createMigrator } = await import('../../src/lib/server/db/migrator');
	const done = await createMigrator(db()).up();
	await closeDb();
	return done.length;
}

function newest(p: string): number {
	const s = statSync(p);
	if (!s.isDirectory()) return s.mtimeMs;
	return Math.max(s.mtimeMs, ...readdirSync(p).map((f) => newest(path.join(p, f))));
}

const STAMP = path.join(ROOT, 'build', '.built');
const INPUTS = ['src', 'static', 'package.json', 'vite.config.ts', 'svelte.config.js'];

/** Build with Vite when build/ is missing or older than its sources. */
export function buildIfNeeded(force = false): boolean {
	const stale =
		force ||
		!existsSync(STAMP) ||
		Math.max(...INPUTS.map((p) => newest(path.join(ROOT, p)))) > statSync(STAMP).mtimeMs;
	if (!stale) return false;
	console.log('Building the app…');
	for (let attempt = 0; ; attempt++) {
		const r = spawnSync('npx', ['vite', 'build', '--logLevel', 'warn'], { cwd: ROOT, encoding: 'utf8' });
		process.stdout.write(r.stdout ?? '');
		process.stderr.write(r.stderr ?? '');
		if (r.status === 0) break;
		// Another build of this checkout is running (e.g. a second test runner): wait for it.
		if (/another Vite build process/i.test(`${r.stdout}${r.stderr}`) && attempt < 60) {
			spawnSync('sleep', ['5']);
			continue;
		}
		throw new Error('vite build failed');
	}
	writeFileSync(STAMP, new Date().toISOString());
	return true;
}

/**
 * Start the built app (`scripts/serve.js`: WEB_CONCURRENCY processes on one port, one per
 * core by default) on 127.0.0.1 in its own process group; resolves once it answers
 * /api/health. Without ORIGIN in the environment the app answers at every loopback name
 * (`scripts/lib/local-origin.js`); `url` is the one to print.
 */
export async function serve(
	port: number,
	env: Record<string, string>,
	stdio: StdioOptions = 'inherit'
): Promise<{ child: ChildProcess; url: string }> {
	const url = `http://localhost:${port}`;
	const child = spawn(process.execPath, [path.join('scripts', 'serve.js')], {
		cwd: ROOT,
		detached: true,
		stdio,
		env: {
			...process.env,
			...env,
			HOST: '127.0.0.1',
			PORT: String(port),
			BODY_SIZE_LIMIT: '12M',
			MIGRATIONS_DIR: path.join(ROOT, 'migrations')
		}
	});
	for (let i = 0; i < 200; i++) {
		if (child.exitCode !== null) throw new Error(`the app exited with code ${child.exitCode}`);
		try {
			const r = await fetch(`${url}/api/health`, { headers: { connection: 'close' } });
			if (r.status < 500 || r.status === 503) return { child, url };
		} catch {
			/* not up yet */
		}
		await new Promise((r) => setTimeout(r, 100));
	}
	throw new Error('the app did not answer within 20 s');
}

/** Stop a server started by `serve` (its whole process group). */
export function stopServe(child: ChildProcess): void {
	child.unref();
	try {
		if (child.pid) process.kill(-child.pid, 'SIGTERM');
	} catch {
		/* already gone */
	}
}
