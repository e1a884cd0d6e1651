/**
 * The lead's overview on years of data: `npm run bench:overview` (not part of `npm test`).
 *
 *  1. MariaDB up (this checkout's private server; reused when it runs), a fresh database
 *     `fieldbench_bench_overview`, migrations.
 *  2. Through the services: an invented workshop with a lead, technicians, apprentices, coils
 *     with approved sheets and jobs. Then, like `bench/sync.ts`'s raw path, multi-row INSERTs
 *     (one transaction per slice): BENCH_READINGS (200,000) readings on four cylinders and two
 *     checks per test, spread over BENCH_YEARS (3) years, each with the workshop's result and
 *     range flag computed by the same functions the sync path uses, and each test's summary
 *     row as the sync path keeps it; and a second workshop with a tenth of that, so every
 *     query must keep to its workshop.
 *  3. The counts are checked (readings stored, tests counted by the overview); exit code 1
 *     when one is off.
 *  4. The overview's server time, BENCH_RUNS (40) times per date range after 3 warm-up runs:
 *     in this process (`readOverview`, the page's and the API's work) and through the served
 *     app (`GET /api/overview` on loopback, signed in as the lead). p50, p95 and max in ms;
 *     the goal (p95 under 300 ms) is reported, never enforced.
 *  5. The query plans the overview relies on (EXPLAIN of both queries for the page's default
 *     range and for all the years).
 * Stops the app, and MariaDB only when this run started it. All data is invented.
 */
import type { ChildProcess } from 'node:child_process';
import os from 'node:os';
import mariadb from 'mariadb';
import { QueryTypes } from 'sequelize';
import { v7 as uuidv7 } from 'uuid';
import { buildIfNeeded, freePort, serve, stopServe } from '../scripts/lib/app';
import { COIL_CHECKS, prng } from './lib/workload';
import { benchMariaDb, freshBenchDatabase } from './lib/setup';
import { Client } from '../tests/helpers/http';
import {
	evaluateReading,
	meterFor,
	rangeUnresolvedOf,
	type CheckSpec,
	type TemperatureSnapshot
} from '../src/lib/flow/reading';
import { stringifyNumbers } from '../src/lib/sync/json';

const DB_NAME = 'fieldbench_bench_overview';
const READINGS = Number(process.env.BENCH_READINGS ?? 200_000);
const YEARS = Number(process.env.BENCH_YEARS ?? 3);
const RUNS = Math.max(5, Number(process.env.BENCH_RUNS ?? 40));
const PASSWORD = 'bench-password-2026';
const GOAL_MS = 300;
const PER_TEST = 8; // four cylinders, two checks
const POSITIONS = ['1', '2', '3', '4'];

/** Invented meters: names, a fine and a coarse range, a lead zero that creeps up over time. */
const METERS = Array.from({ length: 8 }, (_, i) => ({
	name: `Bench meter ${i + 1}`,
	ranges: [
		{ label: '200 Ω', resolution: i % 4 === 3 ? 0.1 : 0.01, pctOfReading: 0.5, counts: 2 },
		{ label: '20 kΩ', resolution: 10, pctOfReading: 0.8, counts: 3 }
	],
	relative: i === 5,
	lead0: 0.06 + i * 0.01,
	drift: i === 2 ? 0.15 : 0.02 // ohms per year; meter 3's leads wear out
}));

const pct = (sorted: number[], p: number) =>
	sorted[Math.min(sorted.length - 1, Math.ceil((p / 100) * sorted.length) - 1)];
const ms = (n: number) => n.toFixed(1);
const sqlTime = (t: number) => new Date(t).toISOString().slice(0, 23).replace('T', ' ');
const day = (t: number) => new Date(t).toISOString().slice(0, 10);

type Env = Record<string, string>;

async function main() {
	const mariaDb = await benchMariaDb();
	let app: ChildProcess | null = null;
	let closeDb: (() => Promise<void>) | null = null;
	let failed = false;
	try {
		const env: Env = await freshBenchDatabase(mariaDb.port, DB_NAME);
		const dbMod = await import('../src/lib/server/db');
		closeDb = dbMod.closeDb;
		const { createUser, createWorkshop } = await import('../src/lib/server/services/workshops');
		const { jobs } = await import('../src/lib/server/services/jobs');
		const { components, sheets } = await import('../src/lib/server/services/components');
		const { readOverview, parseOverviewQuery, OVERVIEW_SQL, boundsOf } =
			await import('../src/lib/server/services/overview');
		const { bucketFor } = await import('../src/lib/overview/tables');

		const pool = mariadb.createPool({
			host: env.DB_HOST,
			port: Number(env.DB_PORT),
			user: env.DB_USER,
			password: env.DB_PASSWORD,
			database: env.DB_NAME,
			connectionLimit: 2
		});
		const now = Date.now();
		const span = YEARS * 365 * 86_400_000;

		/** A workshop with its people, coils, jobs, and `readings` readings inserted in bulk. */
		async function workshop(label: string, readings: number, seed: number) {
			const t0 = performance.now();
			const w = await createWorkshop(`${label} (invented)`);
			const tag = uuidv7().slice(-8);
			const mk = (role: string, i: number) =>
				createUser(w.id, {
					email: `${role}${i}-${tag}@bench.example`,
					name: `${role === 'apprentice' ? 'Apprentice' : role === 'lead' ? 'Lead' : 'Technician'} ${i}`,
					role,
					password: PASSWORD
				});
			const lead = await mk('lead', 1);
			const people = [
				...(await Promise.all([1, 2, 3, 4, 5, 6].map((i) => mk('technician', i)))),
				...(await Promise.all([1, 2, 3].map((i) => mk('apprentice', i))))
			];
			const actor = {
				userId: lead.id,
				workshopId: w.id,
				role: 'lead' as const,
				deviceId: 'bench-setup'
			};
			const parts: { id: string; sheetId: string; partNumber: string; failP: number }[] = [];
			for (let i = 0; i < 12; i++) {
				const partNumber = `LX-${String(1000 + i * 37)}-${tag.slice(-3)}`;
				const componentId = (await components.create(actor, { partNumber, kind: 'ignition_coil' }))
					.id as string;
				const draft = await sheets.create(actor, { componentId, checks: COIL_CHECKS });
				await sheets.update(
					actor,
					draft.id as string,
					draft.version as number,
					{},
					{ serverFields: { state: 'approved', approvedBy: lead.id, approvedAt: new Date() } }
				);
				parts.push({
					id: componentId,
					sheetId: draft.id as string,
					partNumber,
					failP: 0.02 + (i % 5) * 0.03
				});
			}
			const jobIds: string[] = [];
			for (let i = 0; i < 120; i++) {
				jobIds.push(
					(
						await jobs.create(actor, {
							complaint: `Misfire (bench job ${i + 1})`,
							assigneeId: people[i % people.length].id
						})
					).id as string
				);
			}
			const rnd = prng(seed);
			const testCount = Math.ceil(readings / PER_TEST);
			let seq = 0;
			let stored = 0;
			let abandoned = 0;
			const SLICE = 250; // tests per transaction: 2,000 readings
			for (let from = 0; from < testCount; from += SLICE) {
				const testRows: unknown[][] = [];
				const readingRows: unknown[][] = [];
				const summaryRows: unknown[][] = []; // what the sync path adds to test_summaries
				for (let k = from; k < Math.min(testCount, from + SLICE); k++) {
					const at = now - span + Math.floor((span * (k + rnd())) / testCount);
					const part = parts[Math.floor(rnd() * parts.length)];
					const person = people[Math.floor(rnd() * people.length)];
					const m = METERS[(people.indexOf(person) + (rnd() < 0.2 ? 1 : 0)) % METERS.length];
					const years = (at - (now - span)) / (365 * 86_400_000);
					const lead0 = m.relative
						? 0
						: Math.round((m.lead0 + m.drift * years + (rnd() - 0.5) * 0.02) * 1000) / 1000;
					const meter = {
						name: m.name,
						ranges: m.ranges,
						leadResistance: Math.max(0, lead0),
						relativeMode: m.relative
					};
					const temperature: TemperatureSnapshot =
						rnd() < 0.8
							? { mode: 'measured', tempC: Math.round(5 + rnd() * 85) }
							: { mode: 'overnight' };
					const state = rnd() < 0.02 ? 'abandoned' : rnd() < 0.92 ? 'done' : 'in_progress';
					if (state === 'abandoned') abandoned++;
					const testId = uuidv7();
					const jobId = jobIds[Math.floor(rnd() * jobIds.length)];
					testRows.push([
						testId,
						w.id,
						jobId,
						part.id,
						part.sheetId,
						1,
						part.partNumber,
						POSITIONS.join(','),
						person.id,
						JSON.stringify(meter),
						JSON.stringify(temperature),
						state,
						1,
						'{}',
						person.id,
						person.id,
						'bench-device',
						sqlTime(at),
						sqlTime(at),
						sqlTime(at)
					]);
					const faulty = rnd() < part.failP ? POSITIONS[Math.floor(rnd() * 4)] : null;
					const sum = [0, 0, 0, 0, 0, 0];
					for (const position of POSITIONS) {
						for (const check of COIL_CHECKS as CheckSpec[]) {
							if (stored >= readings) break;
							const primary = check.key === 'primary';
							const nominal = primary ? 0.5 + lead0 : 6500;
							const bad = faulty === position ? (primary ? 0.35 : 3000) : 0;
							const value = nominal + bad + (rnd() - 0.5) * (primary ? 0.16 : 2600);
							const rangeLabel = primary ? (rnd() < 0.05 ? '20 kΩ' : '200 Ω') : '20 kΩ';
							const samples = primary
								? [{ value: Math.round(value * 1000) / 1000, unit: 'Ω' }]
								: [{ value: Math.round(value) / 1000, unit: 'kΩ' }];
							const snapshot = meterFor(meter, rangeLabel);
							const server = evaluateReading(check, samples, snapshot, temperature);
							const unresolved = rangeUnresolvedOf(check, meter, rangeLabel, temperature) ? 1 : 0;
							const when = at + 60_000 * (readingRows.length % 8);
							const device = stringifyNumbers({
								value: server.value === Infinity ? null : server.value,
								verdict: server.verdict,
								ol: server.value === Infinity
							});
							sum[0]++;
							if (server.verdict === 'low' || server.verdict === 'high') sum[1]++;
							else if (server.verdict === 'borderline' || server.verdict === 'depends') sum[2]++;
							else if (server.verdict === 'within') sum[3]++;
							sum[4] += unresolved;
							sum[5]++;
							readingRows.push([
								++seq,
								w.id,
								uuidv7(),
								uuidv7(),
								person.id,
								'bench-device',
								sqlTime(when),
								jobId,
								testId,
								check.key,
								position,
								JSON.stringify(samples),
								rangeLabel,
								device,
								stringifyNumbers(server),
								server.verdict,
								unresolved,
								0,
								sqlTime(when)
							]);
							stored++;
						}
					}
					if (sum[0]) summaryRows.push([testId, w.id, ...sum]);
				}
				const conn = await pool.getConnection();
				try {
					await conn.beginTransaction();
					await conn.query(
						`INSERT INTO tests (id, workshop_id, job_id, component_id, sheet_id, sheet_version, part_number, position, technician_id, meter, temperature, state, version, field_versions, created_by, updated_by, device_id, device_time, created_at, updated_at) VALUES ${testRows.map(() => `(${Array(20).fill('?').join(',')})`).join(',')}`,
						testRows.flat()
					);
					if (readingRows.length)
						await conn.query(
							`INSERT INTO readings (seq, workshop_id, id, op_id, created_by, device_id, device_time, job_id, test_id, check_key, position, samples, range_label, device_result, server_result, server_verdict, range_unresolved, mismatch, created_at) VALUES ${readingRows.map(() => `(${Array(19).fill('?').join(',')})`).join(',')}`,
							readingRows.flat()
						);
					if (summaryRows.length)
						await conn.query(
							`INSERT INTO test_summaries (test_id, workshop_id, readings, out_of_spec, cant_tell, ok, unresolved, range_known) VALUES ${summaryRows.map(() => '(?,?,?,?,?,?,?,?)').join(',')}`,
							summaryRows.flat()
						);
					await conn.commit();
				} finally {
					await conn.release();
				}
			}
			await pool.query(
				'UPDATE change_counters SET last_seq = GREATEST(last_seq, ?) WHERE workshop_id = ?',
				[seq, w.id]
			);
			const seconds = (performance.now() - t0) / 1000;
			console.log(
				`${label}: ${stored.toLocaleString('en-GB')} readings in ${testCount.toLocaleString('en-GB')} tests over ${YEARS} years, seeded in ${seconds.toFixed(0)} s`
			);
			return { id: w.id, lead, stored, tests: testCount, abandoned };
		}

		const main = await workshop('Larkspur Auto Electrics', READINGS, 17);
		const side = await workshop('Fennick Garage', Math.round(READINGS / 10), 71);
		await pool.query('ANALYZE TABLE tests, readings, test_summaries');

		// 3. Counts.
		const actor = { userId: main.lead.id, workshopId: main.id, role: 'lead' as const };
		const [{ n }] = await dbMod
			.db()
			.query<{ n: number }>('SELECT COUNT(*) AS n FROM readings WHERE workshop_id = ?', {
				replacements: [main.id],
				type: QueryTypes.SELECT
			});
		const all = await readOverview(
			actor,
			parseOverviewQuery({ from: day(now - span - 86_400_000) })
		);
		const counted = all.parts.reduce((s, p) => s + p.tests, 0);
		const [{ r }] = await dbMod
			.db()
			.query<{ r: number }>('SELECT SUM(readings) AS r FROM test_summaries WHERE workshop_id = ?', {
				replacements: [main.id],
				type: QueryTypes.SELECT
			});
		const checks = [
			{ what: 'readings stored', got: Number(n), want: READINGS },
			{ what: 'readings in the test summaries', got: Number(r), want: READINGS },
			{
				what: 'tests counted over all the years (abandoned left out)',
				got: counted,
				want: main.tests - main.abandoned
			}
		];
		for (const c of checks) {
			const ok = c.got === c.want;
			failed ||= !ok;
			console.log(
				`${ok ? 'ok  ' : 'FAIL'} ${c.what}: ${c.got.toLocaleString('en-GB')}${ok ? '' : ` (expected ${c.want.toLocaleString('en-GB')})`}`
			);
		}

		// 4. Timings.
		buildIfNeeded();
		const served = await serve(
			await freePort(4700),
			{ ...env, ADDRESS_HEADER: 'x-forwarded-for' },
			'ignore'
		);
		app = served.child;
		const lead = new Client(served.url, '10.99.0.1');
		const signIn = await lead.signIn(main.lead.email, PASSWORD);
		if (signIn.status !== 303) throw new Error(`sign-in answered ${signIn.status}`);
		const today = day(now);
		const back = (days: number) => day(now - days * 86_400_000);
		const ranges = [
			{ label: 'last 90 days (the page’s default)', qs: '' },
			{ label: 'last 12 months', qs: `from=${back(364)}&to=${today}` },
			{ label: `all ${YEARS} years`, qs: `from=${back(YEARS * 365 + 1)}&to=${today}` },
			{
				label: `all ${YEARS} years, filtered and sorted`,
				qs: `from=${back(YEARS * 365 + 1)}&to=${today}&part=LX-1&partsSort=-failRate&role=apprentice&metersSort=-leadLatest`
			}
		];
		console.log(`\nOverview server time, ${RUNS} runs each after 3 warm-up runs (ms):`);
		console.log(
			'range'.padEnd(44) +
				'in process p50 / p95 / max'.padEnd(30) +
				'GET /api/overview p50 / p95 / max'
		);
		const results: { label: string; inProcess: number[]; http: number[] }[] = [];
		for (const r of ranges) {
			const q = parseOverviewQuery(Object.fromEntries(new URLSearchParams(r.qs)));
			const inProcess: number[] = [];
			const http: number[] = [];
			for (let i = 0; i < RUNS + 3; i++) {
				const a = performance.now();
				await readOverview(actor, q);
				const b = performance.now();
				const res = await lead.get(`/api/overview${r.qs ? `?${r.qs}` : ''}`);
				await res.arrayBuffer();
				const c = performance.now();
				if (res.status !== 200) throw new Error(`GET /api/overview answered ${res.status}`);
				if (i >= 3) {
					inProcess.push(b - a);
					http.push(c - b);
				}
			}
			inProcess.sort((x, y) => x - y);
			http.sort((x, y) => x - y);
			results.push({ label: r.label, inProcess, http });
			const f = (l: number[]) => `${ms(pct(l, 50))} / ${ms(pct(l, 95))} / ${ms(l[l.length - 1])}`;
			console.log(r.label.padEnd(44) + f(inProcess).padEnd(30) + f(http));
		}
		const worst = Math.max(...results.map((r) => pct(r.http, 95)));
		console.log(
			`\nGoal: p95 under ${GOAL_MS} ms through the API — ${worst < GOAL_MS ? 'met' : 'NOT met'} (worst p95 ${ms(worst)} ms).`
		);

		// 5. Query plans.
		for (const [label, from] of [
			['the default 90 days', back(89)],
			[`all ${YEARS} years`, back(YEARS * 365 + 1)]
		] as const) {
			const { start, end } = boundsOf({ from, to: today });
			console.log(`\nEXPLAIN, ${label}:`);
			for (const [name, sql] of [
				['per-test groups', OVERVIEW_SQL.groups],
				['lead zero', OVERVIEW_SQL.leadZero(bucketFor(from, today))]
			] as const) {
				const rows = await pool.query(`EXPLAIN ${sql}`, [main.id, start, end]);
				console.log(`  ${name}:`);
				console.log(
					'  ' +
						['id', 'select_type', 'table', 'type', 'key', 'key_len', 'ref', 'rows', 'Extra'].join(
							' | '
						)
				);
				for (const p of rows as Record<string, unknown>[])
					console.log(
						'  ' +
							[p.id, p.select_type, p.table, p.type, p.key, p.key_len, p.ref, p.rows, p.Extra]
								.map((v) => (v == null ? '' : String(v)))
								.join(' | ')
					);
			}
		}
		const [{ version }] = await pool.query('SELECT VERSION() AS version');
		const cpus = os.cpus();
		console.log(
			`\n${new Date().toISOString().slice(0, 10)} · ${cpus.length} × ${cpus[0]?.model ?? 'CPU'} · ${(os.totalmem() / 2 ** 30).toFixed(1)} GiB · Node ${process.versions.node} · MariaDB ${version} · ${side.stored.toLocaleString('en-GB')} readings in the other workshop · load average ${os
				.loadavg()
				.map((l) => l.toFixed(1))
				.join(' ')}`
		);
		await pool.end();
	} finally {
		if (app) stopServe(app);
		if (closeDb) await closeDb();
		await mariaDb.stop();
	}
	process.exit(failed ? 1 : 0);
}

main().catch((e) => {
	console.error(e);
	process.exit(1);
});
