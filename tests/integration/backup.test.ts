/**
 * `npm run db:backup` and `npm run db:restore`: the demo workshop plus readings pushed through
 * the real endpoint go into a dump and come back table for table in a fresh database; a dump
 * taken while phones push is consistent (the change feed and its counter agree).
 */
import { spawn, spawnSync } from 'node:child_process';
import { rmSync } from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { backupDatabase, restoreDatabase, rootQuery, tablesOf } from '../../scripts/lib/backup';
import { dropDatabase } from '../../scripts/lib/mariadb';
import { DEMO_PASSWORD, DEMO_USERS, DEMO_WORKSHOP, seedDemo } from '../../src/lib/server/seed/demo';
import { Client } from '../helpers/http';
import { create, push } from '../helpers/sync';

const base = inject('baseURL');
const source = process.env.DB_NAME!;
const restored = `fieldbench_restored_${process.pid}`;
const JOB_1001 = '019a0000-0000-7000-8000-000000000301'; // the demo technician's job
const made: string[] = [];
let tech: Client;

/** `npm run db:<cmd> …` against the test database; its printed lines. */
function npmDb(cmd: 'backup' | 'restore', ...args: string[]) {
	const r = spawnSync('npm', ['run', '--silent', `db:${cmd}`, '--', ...args], { encoding: 'utf8', env: { ...process.env, DB_NAME: source } });
	expect(r.status, r.stderr).toBe(0);
	return r.stdout;
}
const fileFrom = (out: string) => out.match(/to (\S+\.sql)/)![1];

/** The same, without blocking this process (so its own pushes go on meanwhile). */
function npmDbLater(cmd: 'backup', ...args: string[]): Promise<string> {
	return new Promise((resolve, reject) => {
		const child = spawn('npx', ['tsx', 'scripts/db.ts', cmd, ...args], { env: { ...process.env, DB_NAME: source } });
		let out = '';
		child.stdout.on('data', (d) => (out += d));
		child.on('exit', (code) => (code === 0 ? resolve(out) : reject(new Error(`db:${cmd} exited ${code}`))));
	});
}

async function pushReadings(testId: string, count: number, device = 'backup-phone') {
	const ops = Array.from({ length: count }, (_, i) => create('reading', { testId, checkKey: 'primary', samples: [{ value: 0.4 + i / 1000, unit: 'Ω' }] }));
	// Sent again after a dropped connection, as a phone does (this process sat blocked while
	// the npm scripts ran, so a kept-alive connection may have been closed under it).
	const results = await push(tech, device, ops).catch(() => push(tech, device, ops));
	expect(results.every((r) => r.status === 'applied' || r.firstStatus === 'applied')).toBe(true);
	return ops.length;
}

beforeAll(async () => {
	await seedDemo();
	tech = new Client(base, '10.14.0.1');
	expect((await tech.signIn(DEMO_USERS[2].email, DEMO_PASSWORD)).status).toBe(303);
	const test = create('test', { jobId: JOB_1001, position: '2', temperature: { mode: 'measured', tempC: 21 } });
	expect((await push(tech, 'backup-phone', [test]))[0].status).toBe('applied');
	await pushReadings(test.entityId, 120);
	made.push(test.entityId);
});

afterAll(() => {
	dropDatabase(restored);
});

/** Every table's columns, indexes, row count and content checksum (a few queries for all tables). */
function describeTables(database: string) {
	const tables = tablesOf(database);
	const rows = (sql: string) => rootQuery(sql).split('\n').filter(Boolean).map((l) => l.split('\t'));
	const byTable = (list: string[][]) => Object.fromEntries(tables.map((t) => [t, list.filter((r) => r[0] === t).map((r) => r.slice(1).join(' '))]));
	const columns = byTable(rows(`SELECT table_name, ordinal_position, column_name, column_type, is_nullable, column_default, extra FROM information_schema.columns WHERE table_schema = '${database}' ORDER BY table_name, ordinal_position`));
	const indexes = byTable(rows(`SELECT table_name, index_name, seq_in_index, column_name, non_unique FROM information_schema.statistics WHERE table_schema = '${database}' ORDER BY table_name, index_name, seq_in_index`));
	const counts = Object.fromEntries(rows(tables.map((t) => `SELECT '${t}', COUNT(*) FROM \`${database}\`.\`${t}\``).join(' UNION ALL ')));
	const sums = Object.fromEntries(rows(`CHECKSUM TABLE ${tables.map((t) => `\`${database}\`.\`${t}\``).join(', ')} EXTENDED`).map(([name, sum]) => [name.split('.')[1], sum]));
	return Object.fromEntries(tables.map((t) => [t, { columns: columns[t], indexes: indexes[t], rows: Number(counts[t]), checksum: sums[t] }]));
}

describe('backups', () => {
	it('writes a dated dump to .data/backups/ and restores it into a fresh database, every table the same', { timeout: 90_000 }, () => {
		const file = fileFrom(npmDb('backup'));
		try {
			expect(path.dirname(file)).toBe(path.resolve('.data/backups'));
			expect(path.basename(file)).toMatch(new RegExp(`^${source}-\\d{4}-\\d\\d-\\d\\dT\\d\\d-\\d\\d-\\d\\dZ\\.sql$`));
			expect(npmDb('restore', file, '--into', restored)).toContain(`into ${restored}`);
			const before = describeTables(source);
			const after = describeTables(restored);
			expect(Object.keys(before).length).toBeGreaterThan(15);
			expect(after).toEqual(before);
			// The demo workshop and the pushed readings are there.
			const count = (sql: string) => Number(rootQuery(sql).trim());
			expect(count(`SELECT COUNT(*) FROM \`${restored}\`.workshops WHERE id = '${DEMO_WORKSHOP.id}'`)).toBe(1);
			expect(count(`SELECT COUNT(*) FROM \`${restored}\`.readings WHERE test_id = '${made[0]}'`)).toBe(120);
		} finally {
			rmSync(file, { force: true });
		}
	});

	it('refuses to restore over a database that holds tables unless told to replace it', () => {
		const file = backupDatabase(source);
		try {
			expect(() => restoreDatabase(file, restored)).toThrow(/already holds tables/);
			expect(restoreDatabase(file, restored, { replace: true }).tables).toBe(tablesOf(source).length);
		} finally {
			rmSync(file, { force: true });
		}
	});

	it('takes a consistent dump while phones push: the restored feed has every seq once up to its counter', async () => {
		const testId = made[0];
		let pushing = true;
		let pushed = 0;
		// Four pushers of small batches: a commit every few milliseconds while the dump runs.
		const phones = Array.from({ length: 4 }, async (_, k) => {
			while (pushing) pushed += await pushReadings(testId, 5, `backup-phone-${k}`);
		});
		await new Promise((r) => setTimeout(r, 200));
		const out = await npmDbLater('backup');
		pushing = false;
		await Promise.all(phones);
		const file = fileFrom(out);
		try {
			restoreDatabase(file, restored, { replace: true });
			const q = (sql: string) => rootQuery(sql).trim();
			const last = Number(q(`SELECT last_seq FROM \`${restored}\`.change_counters WHERE workshop_id = '${DEMO_WORKSHOP.id}'`));
			const tables = ['changes', 'readings', 'spark_tests', 'swap_tests', 'signoffs', 'circuit_tests'];
			const seqs = q(tables.map((t) => `SELECT seq FROM \`${restored}\`.${t} WHERE workshop_id = '${DEMO_WORKSHOP.id}'`).join(' UNION ALL '))
				.split('\n')
				.map(Number)
				.sort((a, b) => a - b);
			expect(seqs).toEqual(Array.from({ length: last }, (_, i) => i + 1));
			// Every reading's op is its own, once; every reading's test is there.
			expect(q(`SELECT COUNT(*) - COUNT(DISTINCT op_id) FROM \`${restored}\`.readings`)).toBe('0');
			expect(q(`SELECT COUNT(*) FROM \`${restored}\`.readings r LEFT JOIN \`${restored}\`.tests t ON t.id = r.test_id WHERE t.id IS NULL AND r.workshop_id = '${DEMO_WORKSHOP.id}'`)).toBe('0');
			expect(pushed).toBeGreaterThan(0);
		} finally {
			rmSync(file, { force: true });
		}
	}, 60_000);
});

