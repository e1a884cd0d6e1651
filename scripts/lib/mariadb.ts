/**
 * A private MariaDB on loopback for Fieldbench: install (Debian package), initialise a data
 * directory inside the checkout (.data/, git-ignored), start `mariadbd` on 127.0.0.1, create
 * databases and the application user, and stop it again.
 *
 * Steps of `startServer()`:
 *  1. find the binaries (install `mariadb-server` with apt-get when missing and we are root);
 *  2. write the defaults file (.data/mariadb.cnf) — it is always the first option we pass;
 *     commits are durable (`DURABLE`: `innodb_flush_log_at_trx_commit=1`, `sync_binlog=1`);
 *  3. initialise the data directory once;
 *  4. reuse a running server of ours (pid file + ping; its durability settings brought to
 *     the defaults file's), or clear a stale pid file;
 *  5. pick the port (3307 or the next free one), start in the background, wait for ping;
 *  6. the caller then creates its database with `ensureDatabase()`.
 */
import { execFileSync, spawn, spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import net from 'node:net';
import path from 'node:path';
import { alive, readPid } from './pid';

export const ROOT = path.resolve(import.meta.dirname, '..', '..');
const DATA = path.join(ROOT, '.data');
const DATADIR = path.join(DATA, 'mariadb');
export const CNF = path.join(DATA, 'mariadb.cnf');
const PORT_FILE = path.join(DATA, 'mariadb.port');
const PID_FILE = path.join(DATA, 'mariadb.pid');
const tag = createHash('sha1').update(ROOT).digest('hex').slice(0, 8);
/** Unix socket paths are limited to ~107 bytes, so the socket lives under /tmp. */
const SOCKET = `/tmp/fieldbench-${tag}.sock`;

export const APP_USER = process.env.DB_USER ?? 'fieldbench';
export const APP_PASSWORD = process.env.DB_PASSWORD ?? 'fieldbench-local-only';
const DEFAULT_PORT = Number(process.env.DB_PORT ?? 3307);
const isRoot = process.getuid?.() === 0;

export function which(bin: string): string | null {
	for (const dir of ['/usr/sbin', '/usr/bin', '/usr/local/sbin', '/usr/local/bin']) {
		if (existsSync(path.join(dir, bin))) return path.join(dir, bin);
	}
	return null;
}

/** Install mariadb-server from Debian's packages when it is missing. */
export function ensureInstalled(): void {
	if (which('mariadbd') && which('mariadb-install-db')) return;
	if (!isRoot) {
		throw new Error(
			'MariaDB is not installed. Run as root:  apt-get update && apt-get install -y mariadb-server'
		);
	}
	console.log('Installing mariadb-server from Debian packages…');
	const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' };
	execFileSync('apt-get', ['update', '-qq'], { stdio: 'inherit', env });
	execFileSync('apt-get', ['install', '-y', '-qq', 'mariadb-server'], { stdio: 'inherit', env });
	// Debian's package may start its own service; we never use it, so stop it when it runs.
	spawnSync('service', ['mariadb', 'stop'], { stdio: 'ignore' });
}

/** The durability settings of every MariaDB the project starts (the cluster's nodes too). */
export const DURABLE = ['innodb_flush_log_at_trx_commit=1', 'sync_binlog=1'];

function writeDefaults(port: number): void {
	mkdirSync(DATA, { recursive: true });
	const cnf = [
		'[mysqld]',
		`datadir=${DATADIR}`,
		`socket=${SOCKET}`,
		`pid-file=${PID_FILE}`,
		`log-error=${path.join(DATA, 'mariadb.err')}`,
		`port=${port}`,
		'bind-address=127.0.0.1',
		'skip-name-resolve',
		'character-set-server=utf8mb4',
		'collation-server=utf8mb4_unicode_ci',
		'default-time-zone=+00:00',
		// Durable commits: a push acknowledged to a phone (which then clears its outbox) is on
		// disk before the answer leaves; the binary log, when someone turns it on, likewise.
		...DURABLE,
		'max_connections=300',
		'',
		'[client]',
		`socket=${SOCKET}`,
		`port=${port}`,
		'host=127.0.0.1',
		'user=root',
		''
	].join('\n');
	writeFileSync(CNF, cnf);
}

/** Whether nothing listens on 127.0.0.1:`port`. */
export function portFree(port: number): Promise<boolean> {
	return new Promise((resolve) => {
		const srv = net.createServer();
		srv.once('error', () => resolve(false));
		srv.listen(port, '127.0.0.1', () => srv.close(() => resolve(true)));
	});
}

/** The first free port from `from` upwards. */
export async function freePort(from: number): Promise<number> {
	let port = from;
	while (!(await portFree(port))) port++;
	return port;
}

function ping(): boolean {
	const r = spawnSync(
		which('mariadb-admin')!,
		[`--defaults-file=${CNF}`, '--protocol=TCP', 'ping'],
		{
			stdio: 'ignore',
			timeout: 5000
		}
	);
	return r.status === 0;
}


/** Port of the running private server, or null. */
export function runningPort(): number | null {
	const pid = readPid(PID_FILE);
	if (!pid || !alive(pid) || !existsSync(PORT_FILE)) return null;
	return Number(readFileSync(PORT_FILE, 'utf8').trim());
}

async function sleep(ms: number) {
	await new Promise((r) => setTimeout(r, ms));
}

/** Start (or reuse) the private server. `started` says whether this call started it. */
export async function startServer(): Promise<{ port: number; started: boolean }> {
	ensureInstalled();
	const existing = runningPort();
	if (existing) {
		writeDefaults(existing);
		if (ping()) {
			// A server started before the durable settings: both are dynamic, so set them now.
			rootSql('SET GLOBAL innodb_flush_log_at_trx_commit = 1; SET GLOBAL sync_binlog = 1');
			return { port: existing, started: false };
		}
	}
	const stale = readPid(PID_FILE);
	if (stale && !alive(stale)) rmSync(PID_FILE, { force: true });

	const port = await freePort(DEFAULT_PORT);
	writeDefaults(port);
	if (port !== DEFAULT_PORT) console.log(`Port ${DEFAULT_PORT} is taken; MariaDB uses ${port}.`);

	if (!existsSync(path.join(DATADIR, 'mysql'))) {
		mkdirSync(DATADIR, { recursive: true });
		execFileSync(
			which('mariadb-install-db')!,
			[
				`--defaults-file=${CNF}`,
				`--datadir=${DATADIR}`,
				...(isRoot ? ['--user=root'] : []),
				'--auth-root-authentication-method=normal',
				'--skip-test-db'
			],
			{ stdio: 'ignore' }
		);
	}
	const child = spawn(
		which('mariadbd')!,
		[`--defaults-file=${CNF}`, ...(isRoot ? ['--user=root'] : [])],
		{
			detached: true,
			stdio: 'ignore'
		}
	);
	child.unref();
	for (let i = 0; i < 300; i++) {
		if (ping()) {
			writeFileSync(PORT_FILE, String(port));
			return { port, started: true };
		}
		await sleep(100);
	}
	throw new Error(`MariaDB did not answer within 30 s; see ${path.join(DATA, 'mariadb.err')}`);
}

/** Run SQL as the local root user over the socket. */
export function rootSql(sql: string): void {
	execFileSync(which('mariadb')!, [`--defaults-file=${CNF}`, '--protocol=SOCKET', '-e', sql], {
		stdio: ['ignore', 'ignore', 'inherit']
	});
}

/** Create a database and grant the application user all rights on it. */
export function ensureDatabase(name: string): void {
	if (!/^[a-z0-9_]+$/.test(name)) throw new Error(`Bad database name: ${name}`);
	const pw = APP_PASSWORD.replace(/'/g, "''");
	rootSql(
		[
			`CREATE DATABASE IF NOT EXISTS \`${name}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`,
			`CREATE USER IF NOT EXISTS '${APP_USER}'@'127.0.0.1' IDENTIFIED BY '${pw}'`,
			`CREATE USER IF NOT EXISTS '${APP_USER}'@'localhost' IDENTIFIED BY '${pw}'`,
			`GRANT ALL PRIVILEGES ON \`${name}\`.* TO '${APP_USER}'@'127.0.0.1'`,
			`GRANT ALL PRIVILEGES ON \`${name}\`.* TO '${APP_USER}'@'localhost'`
		].join('; ')
	);
}

export function dropDatabase(name: string): void {
	if (!/^[a-z0-9_]+$/.test(name)) throw new Error(`Bad database name: ${name}`);
	rootSql(`DROP DATABASE IF EXISTS \`${name}\``);
}

/** Stop the private server and wait until its pid file and port are gone. */
export async function stopServer(): Promise<boolean> {
	const port = runningPort();
	if (!port) {
		rmSync(PID_FILE, { force: true });
		return false;
	}
	writeDefaults(port);
	spawnSync(which('mariadb-admin')!, [`--defaults-file=${CNF}`, '--protocol=SOCKET', 'shutdown'], {
		stdio: 'ignore',
		timeout: 30_000
	});
	for (let i = 0; i < 300; i++) {
		if (!existsSync(PID_FILE) && (await portFree(port))) {
			rmSync(PORT_FILE, { force: true });
			return true;
		}
		await sleep(100);
	}
	throw new Error('MariaDB did not stop within 30 s');
}

/** Environment for the app and the tests to reach database `name`. */
export function dbEnv(port: number, name: string): Record<string, string> {
	return {
		DB_HOST: '127.0.0.1',
		DB_PORT: String(port),
		DB_NAME: name,
		DB_USER: APP_USER,
		DB_PASSWORD: APP_PASSWORD
	};
}
