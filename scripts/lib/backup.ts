/**
 * Backups of the private MariaDB with Debian's `mariadb-dump`.
 *
 * `backupDatabase` writes one consistent dump: `--single-transaction` reads every InnoDB
 * table inside one transaction (a snapshot as of its start) without locking the tables, so
 * the app keeps serving and a push that commits meanwhile is either wholly in the dump or not
 * at all. The dump holds the tables, not a CREATE DATABASE, so it can be restored under any
 * name. Files go to `.data/backups/<database>-<UTC date and time>.sql`.
 *
 * `restoreDatabase` loads a dump into a fresh database: it refuses a database that already
 * holds tables unless asked to replace it (then it is dropped first), creates it, grants the
 * app's user, and loads the file in one `mariadb` client run that stops at the first error.
 */
import { spawnSync } from 'node:child_process';
import { closeSync, existsSync, mkdirSync, openSync, statSync } from 'node:fs';
import path from 'node:path';
import { CNF, dropDatabase, ensureDatabase, ROOT, which } from './mariadb';

export const BACKUP_DIR = path.join(ROOT, '.data', 'backups');

function bin(name: string): string {
	const found = which(name);
	if (!found) throw new Error(`${name} is not installed (Debian package mariadb-client)`);
	return found;
}

/** Run SQL as the local root user; the rows as tab-separated text. */
export function rootQuery(sql: string): string {
	const r = spawnSync(bin('mariadb'), [`--defaults-file=${CNF}`, '--protocol=SOCKET', '-N', '-B', '-e', sql], { encoding: 'utf8' });
	if (r.status !== 0) throw new Error(`mariadb: ${r.stderr.trim()}`);
	return r.stdout;
}

const checkName = (name: string) => {
	if (!/^[a-z0-9_]+$/.test(name)) throw new Error(`Bad database name: ${name}`);
	return name;
};

/** The file name of a backup of `database` made at `at`: `<database>-2026-12-02T08-15-30Z.sql`. */
export function backupFileName(database: string, at = new Date()): string {
	return `${checkName(database)}-${at.toISOString().slice(0, 19).replace(/:/g, '-')}Z.sql`;
}

/** Dump `database` (one transaction, no table locks) into `dir`; returns the file's path. */
export function backupDatabase(database: string, dir = BACKUP_DIR): string {
	mkdirSync(dir, { recursive: true });
	const file = path.join(dir, backupFileName(database));
	const out = openSync(file, 'w');
	try {
		const r = spawnSync(
			bin('mariadb-dump'),
			[
				`--defaults-file=${CNF}`,
				'--protocol=SOCKET',
				'--single-transaction',
				'--quick',
				'--routines',
				'--triggers',
				'--hex-blob',
				'--default-character-set=utf8mb4',
				'--tz-utc',
				checkName(database)
			],
			{ stdio: ['ignore', out, 'pipe'], encoding: 'utf8' }
		);
		if (r.status !== 0) throw new Error(`mariadb-dump failed: ${r.stderr.trim()}`);
	} finally {
		closeSync(out);
	}
	return file;
}

/** Tables in `database` (none when it does not exist). */
export function tablesOf(database: string): string[] {
	const out = rootQuery(`SELECT table_name FROM information_schema.tables WHERE table_schema = '${checkName(database)}' ORDER BY table_name`);
	return out.split('\n').filter(Boolean);
}

/** Load `file` into a fresh database `target`; `replace` drops a non-empty one first. */
export function restoreDatabase(file: string, target: string, { replace = false } = {}): { tables: number } {
	if (!existsSync(file) || !statSync(file).isFile()) throw new Error(`No such backup file: ${file}`);
	checkName(target);
	if (tablesOf(target).length) {
		if (!replace) throw new Error(`Database ${target} already holds tables; restore into another (--into NAME) or add --replace to drop it first`);
		dropDatabase(target);
	}
	ensureDatabase(target);
	const input = openSync(file, 'r');
	try {
		const r = spawnSync(bin('mariadb'), [`--defaults-file=${CNF}`, '--protocol=SOCKET', '--default-character-set=utf8mb4', target], {
			stdio: [input, 'ignore', 'pipe'],
			encoding: 'utf8'
		});
		if (r.status !== 0) throw new Error(`Restoring ${path.basename(file)} failed: ${r.stderr.trim()}`);
	} finally {
		closeSync(input);
	}
	return { tables: tablesOf(target).length };
}
