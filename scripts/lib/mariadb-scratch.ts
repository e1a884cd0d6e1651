/**
 * A throw-away MariaDB for tests that stop, kill and restart the database server: its own
 * data directory (a temporary folder), defaults file, socket and port, so the checkout's
 * private server (scripts/lib/mariadb.ts) and everything using it are never touched.
 *
 * Same settings as the private server (durable commits: InnoDB's log and the binary log
 * flushed to disk at every commit, UTC, utf8mb4), so what a test proves about a crash holds for it too.
 */
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { createHash } from 'node:crypto';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { APP_PASSWORD, APP_USER, DURABLE, ensureInstalled, freePort, portFree } from './mariadb';

const bin = (name: string) =>
	['/usr/sbin', '/usr/bin', '/usr/local/sbin', '/usr/local/bin']
		.map((d) => path.join(d, name))
		.find((p) => existsSync(p)) ?? name;
const isRoot = process.getuid?.() === 0;
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

export class ScratchMariaDb {
	readonly dir: string;
	readonly cnf: string;
	readonly socket: string;
	readonly pidFile: string;
	port = 0;
	private child: ChildProcess | null = null;

	constructor(label = 'scratch') {
		this.dir = mkdtempSync(path.join(tmpdir(), `fieldbench-${label}-`));
		this.cnf = path.join(this.dir, 'my.cnf');
		this.pidFile = path.join(this.dir, 'mariadb.pid');
		const tag = createHash('sha1').update(this.dir).digest('hex').slice(0, 10);
		this.socket = `/tmp/fieldbench-${tag}.sock`;
	}

	private writeDefaults() {
		const datadir = path.join(this.dir, 'data');
		writeFileSync(
			this.cnf,
			[
				'[mysqld]',
				`datadir=${datadir}`,
				`socket=${this.socket}`,
				`pid-file=${this.pidFile}`,
				`log-error=${path.join(this.dir, 'mariadb.err')}`,
				`port=${this.port}`,
				'bind-address=127.0.0.1',
				'skip-name-resolve',
				'character-set-server=utf8mb4',
				'collation-server=utf8mb4_unicode_ci',
				'default-time-zone=+00:00',
				...DURABLE,
				'innodb_buffer_pool_size=64M',
				'max_connections=300',
				'',
				'[client]',
				`socket=${this.socket}`,
				`port=${this.port}`,
				'host=127.0.0.1',
				'user=root',
				''
			].join('\n')
		);
		return datadir;
	}

	/** Initialise the data directory and start the server on a free port. */
	async init(fromPort = 3400): Promise<void> {
		ensureInstalled();
		this.port = await freePort(fromPort);
		const datadir = this.writeDefaults();
		mkdirSync(datadir, { recursive: true });
		const r = spawnSync(
			bin('mariadb-install-db'),
			[`--defaults-file=${this.cnf}`, `--datadir=${datadir}`, ...(isRoot ? ['--user=root'] : []), '--auth-root-authentication-method=normal', '--skip-test-db'],
			{ stdio: 'ignore' }
		);
		if (r.status !== 0) throw new Error('mariadb-install-db failed');
		await this.start();
	}

	ping(): boolean {
		return (
			spawnSync(bin('mariadb-admin'), [`--defaults-file=${this.cnf}`, '--protocol=TCP', 'ping'], {
				stdio: 'ignore',
				timeout: 5000
			}).status === 0
		);
	}

	/** Start the server (same port and data) and wait until it answers. */
	async start(): Promise<void> {
		const child = spawn(bin('mariadbd'), [`--defaults-file=${this.cnf}`, ...(isRoot ? ['--user=root'] : [])], {
			detached: true,
			stdio: 'ignore'
		});
		child.unref();
		this.child = child;
		for (let i = 0; i < 600; i++) {
			if (child.exitCode !== null) throw new Error(`mariadbd exited (${child.exitCode}); see ${this.dir}/mariadb.err`);
			if (this.ping()) return;
			await sleep(100);
		}
		throw new Error(`MariaDB did not answer within 60 s; see ${this.dir}/mariadb.err`);
	}

	/** The server's pid, from its pid file. */
	pid(): number | null {
		if (!existsSync(this.pidFile)) return this.child?.pid ?? null;
		const pid = Number(readFileSync(this.pidFile, 'utf8').trim());
		return pid > 0 ? pid : null;
	}

	/** Kill the server as a crash would (SIGKILL) and wait until its port is free. */
	async kill(): Promise<void> {
		const pid = this.pid();
		if (pid) {
			try {
				process.kill(pid, 'SIGKILL');
			} catch {
				/* already gone */
			}
		}
		await this.waitGone();
		rmSync(this.pidFile, { force: true });
	}

	/** Stop cleanly (`mariadb-admin shutdown`) and wait until its port is free. */
	async stop(): Promise<void> {
		spawnSync(bin('mariadb-admin'), [`--defaults-file=${this.cnf}`, '--protocol=SOCKET', 'shutdown'], {
			stdio: 'ignore',
			timeout: 60_000
		});
		await this.waitGone();
	}

	private async waitGone() {
		for (let i = 0; i < 600; i++) {
			if (await portFree(this.port)) {
				rmSync(this.socket, { force: true }); // a killed server leaves its socket file behind
				return;
			}
			await sleep(100);
		}
		throw new Error('MariaDB did not stop within 60 s');
	}

	/** Run SQL as root over the socket. */
	sql(statements: string): string {
		const r = spawnSync(bin('mariadb'), [`--defaults-file=${this.cnf}`, '--protocol=SOCKET', '-N', '-B', '-e', statements], {
			encoding: 'utf8'
		});
		if (r.status !== 0) throw new Error(`SQL failed: ${r.stderr}`);
		return r.stdout;
	}

	/** Create a database and the application user with all rights on it; its environment. */
	createDatabase(name: string): Record<string, string> {
		if (!/^[a-z0-9_]+$/.test(name)) throw new Error(`Bad database name: ${name}`);
		const pw = APP_PASSWORD.replace(/'/g, "''");
		this.sql(
			[
				`CREATE DATABASE IF NOT EXISTS \`${name}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`,
				...['127.0.0.1', 'localhost'].flatMap((h) => [
					`CREATE USER IF NOT EXISTS '${APP_USER}'@'${h}' IDENTIFIED BY '${pw}'`,
					`GRANT ALL PRIVILEGES ON \`${name}\`.* TO '${APP_USER}'@'${h}'`
				])
			].join('; ')
		);
		return { DB_HOST: '127.0.0.1', DB_PORT: String(this.port), DB_NAME: name, DB_USER: APP_USER, DB_PASSWORD: APP_PASSWORD };
	}

	/** Kill the server and remove its files now (for a process that is exiting). */
	destroyNow(): void {
		const pid = this.pid();
		try {
			if (pid) process.kill(pid, 'SIGKILL');
		} catch {
			/* already gone */
		}
		rmSync(this.dir, { recursive: true, force: true });
		rmSync(this.socket, { force: true });
	}

	/** Stop the server and remove everything it wrote. */
	async destroy(): Promise<void> {
		try {
			await this.kill();
		} finally {
			rmSync(this.dir, { recursive: true, force: true });
			rmSync(this.socket, { force: true });
		}
	}
}
