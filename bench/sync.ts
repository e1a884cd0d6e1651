/**
 * Sync push benchmark: `npm run bench:sync` (not part of `npm test`).
 *
 *  1. MariaDB up (the private server of this checkout; reused when it already runs), a fresh
 *     database `fieldbench_bench`, migrations, a build when the sources changed, the app
 *     served as `npm start` serves it (scripts/serve.js: WEB_CONCURRENCY processes, one per
 *     core by default) on a free port with ADDRESS_HEADER=x-forwarded-for.
 *  2. Through the services (the one write path): per round an invented workshop, a lead, one
 *     technician per simulated device, a job per technician, a component with an approved
 *     two-check sheet, and four tests per job.
 *  3. Each device signs in over HTTP from its own address (the sign-in throttle counts per
 *     address) and pushes its share of the 10,000 readings in batches, all devices at once,
 *     each device's batches in order. Every batch goes through the whole endpoint: session,
 *     size and schema checks, the ledger, the server's recomputed result, the change-feed
 *     seq, one transaction per batch.
 *  4. The same batches again: every op must answer `duplicate` and nothing may change.
 *  5. The very rows the endpoint stored, inserted with the `mariadb` driver alone into a copy
 *     table (`CREATE TABLE readings_raw LIKE readings`), the same batches, one transaction per
 *     batch: a multi-row INSERT per batch on one connection; `conn.batch()` on one
 *     connection; multi-row INSERTs on one connection per device at once.
 *  6. Rounds (5 by default) repeat 2–5 with fresh readings; the medians are printed: rows/s,
 *     p50/p95 per batch and the CPU seconds of the app (all its processes), MariaDB and this
 *     process, for the
 *     push, the replay and each raw path; then the endpoint's rate over the fastest
 *     one-connection raw path (goal: at least 0.5) and over the parallel raw path.
 *  7. Counts are checked every round (10,000 applied and stored, the feed moved by 10,000,
 *     the replay stored nothing, each raw path stored 10,000); exit code 1 when one fails.
 *     The timing goal is reported, never enforced. Stops the app servers, and MariaDB only
 *     when this run started it.
 *
 * Knobs (environment): BENCH_READINGS (10000), BENCH_DEVICES (4), BENCH_BATCH (ops per push:
 * the phone's PUSH_BATCH, 500), BENCH_ROUNDS (5), WEB_CONCURRENCY (app processes, as for `npm start`),
 * BENCH_WARMUP (readings per device pushed, replayed and inserted raw into a separate workshop
 * first, 1,000 by default, so that the app's processes run compiled code as a server that has
 * been up a while does; 0: no warm-up),
 * BENCH_SERVER_NODE_OPTIONS (NODE_OPTIONS for the app only, e.g. `--import ./profiler.mjs`;
 * node refuses `--cpu-prof` there). All data is invented.
 */
import type { ChildProcess } from 'node:child_process';
import http from 'node:http';
import { existsSync, readdirSync, readFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import mariadb from 'mariadb';
import { QueryTypes } from 'sequelize';
import { v7 as uuidv7 } from 'uuid';
import { buildIfNeeded, freePort, serve, stopServe } from '../scripts/lib/app';
import { ROOT } from '../scripts/lib/mariadb';
import { COIL_CHECKS, prng } from './lib/workload';
import { benchMariaDb, freshBenchDatabase, stopOnInterrupt } from './lib/setup';
import { Client } from '../tests/helpers/http';
import { PUSH_BATCH } from '../src/lib/sync/protocol';
import { STORED_CHANGE } from '../src/lib/server/db/append-tables';
import {
	evaluateReading,
	meterFor,
	type CheckSpec,
	type TemperatureSnapshot
} from '../src/lib/flow/reading';

const DB_NAME = 'fieldbench_bench';
const READINGS = Number(process.env.BENCH_READINGS ?? 10_000);
const DEVICES = Number(process.env.BENCH_DEVICES ?? 4);
const BATCH = Number(process.env.BENCH_BATCH ?? PUSH_BATCH);
const WARMUP = Math.max(0, Number(process.env.BENCH_WARMUP ?? 1000));
const ROUNDS = Math.max(1, Number(process.env.BENCH_ROUNDS ?? 5));
const PASSWORD = 'bench-password-2026';
const GOAL = 0.5;

/** An invented meter: a 200 Ω range for the primary, a 20 kΩ range for the secondary. */
const METER = {
	name: 'Bench meter',
	ranges: [
		{ label: '200 Ω', resolution: 0.01, pctOfReading: 0.5, counts: 2 },
		{ label: '20 kΩ', resolution: 10, pctOfReading: 0.8, counts: 3 }
	],
	leadResistance: 0.1,
	relativeMode: false
};
const TEMPERATURE: TemperatureSnapshot = { mode: 'measured', tempC: 21 };
const POSITIONS = ['1', '2', '3', '4'];

type Op = {
	opId: string;
	entity: 'reading';
	entityId: string;
	kind: 'create';
	baseVersion: 0;
	fields: Record<string, unknown>;
	deviceTime: string;
};
type Batch = { device: number; deviceId: string; ops: Op[]; body: string };
type Result = { opId: string; status: string; firstStatus?: string; reason?: string };

const percentile = (sorted: number[], p: number) =>
	sorted.length
		? sorted[Math.min(sorted.length - 1, Math.ceil((p / 100) * sorted.length) - 1)]
		: NaN;
const fmt = (n: number, d = 0) =>
	n.toLocaleString('en-GB', { minimumFractionDigits: d, maximumFractionDigits: d });

/** Readings of one device: three samples each, alternating over the tests and both checks. */
function readingsFor(device: number, count: number, testIds: string[], checks: CheckSpec[]): Op[] {
	const rnd = prng(1000 + device);
	const start = Date.UTC(2026, 11, 1, 8, 0, 0) + device * 1000;
	const ops: Op[] = [];
	for (let i = 0; i < count; i++) {
		const check = checks[i % checks.length];
		const primary = check.key === 'primary';
		const centre = primary ? 0.6 : 6.5; // Ω with 0.1 Ω leads / kΩ
		const rangeLabel = primary ? '200 Ω' : '20 kΩ';
		const samples = [0, 1, 2].map(() => ({
			value: Math.round(centre * (0.9 + 0.2 * rnd()) * 1000) / 1000,
			unit: primary ? 'Ω' : 'kΩ'
		}));
		const result = evaluateReading(check, samples, meterFor(METER, rangeLabel), TEMPERATURE);
		ops.push({
			opId: uuidv7(),
			entity: 'reading',
			entityId: uuidv7(),
			kind: 'create',
			baseVersion: 0,
			fields: {
				testId: testIds[Math.floor(i / checks.length) % testIds.length],
				checkKey: check.key,
				rangeLabel,
				samples,
				deviceResult: { value: result.value, verdict: result.verdict }
			},
			deviceTime: new Date(start + i * 4000).toISOString()
		});
	}
	return ops;
}

/** CPU seconds (user + system) a process has used so far, or NaN where /proc is missing. */
function cpuSeconds(pid: number | undefined): number {
	try {
		const stat = readFileSync(`/proc/${pid}/stat`, 'utf8');
		const f = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
		return (Number(f[11]) + Number(f[12])) / 100; // utime, stime in clock ticks (USER_HZ = 100)
	} catch {
		return NaN;
	}
}
const mariadbPid = () => {
	const file = path.join(ROOT, '.data', 'mariadb.pid');
	return existsSync(file) ? Number(readFileSync(file, 'utf8').trim()) : undefined;
};

/** A process and all its descendants (the app's cluster), from /proc. */
function processTree(root: number | undefined): number[] {
	if (root === undefined) return [];
	const parent = new Map<number, number>();
	for (const d of readdirSync('/proc')) {
		if (!/^\d+$/.test(d)) continue;
		try {
			const stat = readFileSync(`/proc/${d}/stat`, 'utf8');
			parent.set(Number(d), Number(stat.slice(stat.lastIndexOf(')') + 2).split(' ')[1]));
		} catch {
			/* gone */
		}
	}
	const tree = [root];
	for (let i = 0; i < tree.length; i++) for (const [pid, ppid] of parent) if (ppid === tree[i]) tree.push(pid);
	return tree;
}

type Pids = { app: number | undefined; db?: number };
/** CPU seconds of the app server, MariaDB and this process (the clients, or the raw inserts). */
type Cpu = { app: number; db: number; bench: number };
const ownCpu = () => {
	const u = process.cpuUsage();
	return (u.user + u.system) / 1e6;
};
const cpuOf = (p: Pids): Cpu => ({
	app: processTree(p.app).reduce((n: number, pid) => n + cpuSeconds(pid), 0),
	db: cpuSeconds(p.db),
	bench: ownCpu()
});
const cpuSince = (p: Pids, from: Cpu): Cpu => {
	const now = cpuOf(p);
	return { app: now.app - from.app, db: now.db - from.db, bench: now.bench - from.bench };
};

/**
 * POST a JSON body with the client's session cookie over node:http, one kept-alive socket per
 * device: a phone's connection, and less of the shared CPU spent in the benchmark's own
 * client than with fetch.
 */
const agents = new Map<Client, http.Agent>();
function post(c: Client, path: string, body: string): Promise<{ status: number; text: string }> {
	let agent = agents.get(c);
	if (!agent) agents.set(c, (agent = new http.Agent({ keepAlive: true, maxSockets: 1 })));
	const url = new URL(path, c.base);
	return new Promise((resolve, reject) => {
		const req = http.request(
			url,
			{
				method: 'POST',
				agent,
				headers: {
					...c.headers({ 'content-type': 'application/json', accept: 'application/json' }),
					'content-length': Buffer.byteLength(body)
				}
			},
			(res) => {
				const chunks: Buffer[] = [];
				res.on('data', (d: Buffer) => chunks.push(d));
				res.on('end', () => resolve({ status: res.statusCode ?? 0, text: Buffer.concat(chunks).toString('utf8') }));
				res.on('error', reject);
			}
		);
		req.on('error', reject);
		req.end(body);
	});
}

/** Push every device's batches, the devices at the same time, each in order. */
async function pushAll(clients: Client[], batches: Batch[], pids: Pids) {
	const cpu0 = cpuOf(pids);
	const latencies: number[] = [];
	const results = new Map<string, Result>();
	const byDevice = clients.map((_, d) => batches.filter((b) => b.device === d));
	const t0 = performance.now();
	await Promise.all(
		byDevice.map(async (list, d) => {
			for (const b of list) {
				const s = performance.now();
				const r = await post(clients[d], '/api/sync/push', b.body);
				const body = JSON.parse(r.text) as { results?: Result[] };
				latencies.push(performance.now() - s);
				if (r.status !== 200 || !body.results)
					throw new Error(`push ${r.status}: ${r.text.slice(0, 500)}`);
				for (const x of body.results) results.set(x.opId, x);
			}
		})
	);
	const seconds = (performance.now() - t0) / 1000;
	latencies.sort((a, b) => a - b);
	return {
		seconds,
		cpu: cpuSince(pids, cpu0),
		results,
		p50: percentile(latencies, 50),
		p95: percentile(latencies, 95)
	};
}

type Phase = { seconds: number; p50: number; p95: number; cpu: Cpu };
type Round = { push: Phase; replay: Phase; raw: Record<RawPath, Phase>; mismatches: number };
type RawPath = 'multi' | 'batch' | 'multiParallel';
const RAW_LABELS: Record<RawPath, string> = {
	multi: 'raw: multi-row INSERT, 1 connection',
	batch: 'raw: conn.batch(), 1 connection',
	multiParallel: `raw: multi-row INSERT, ${DEVICES} connections`
};
const median = (xs: number[]) => {
	const s = [...xs].sort((a, b) => a - b);
	return s.length % 2 ? s[(s.length - 1) / 2] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
};

async function main() {
	const failures: string[] = [];
	const check = (ok: boolean, what: string) => {
		if (!ok) console.log(`  FAIL ${what}`);
		if (!ok) failures.push(what);
		return ok;
	};
	const mariaDb = await benchMariaDb();
	const apps: ChildProcess[] = [];
	stopOnInterrupt(apps, mariaDb);
	let pool: mariadb.Pool | null = null;
	let closeDb: (() => Promise<void>) | null = null;
	try {
		const env = await freshBenchDatabase(mariaDb.port, DB_NAME);
		buildIfNeeded();
		const served = await serve(
			await freePort(4600),
			{
				...env,
				ADDRESS_HEADER: 'x-forwarded-for',
				...(process.env.BENCH_SERVER_NODE_OPTIONS
					? { NODE_OPTIONS: process.env.BENCH_SERVER_NODE_OPTIONS }
					: {})
			},
			'inherit'
		);
		apps.push(served.child);
		const pids: Pids = { app: served.child.pid, db: mariadbPid() };
		const workers = Math.max(1, processTree(served.child.pid).length - 1);

		// Data through the services (the one write path), as the integration tests do.
		const dbMod = await import('../src/lib/server/db');
		closeDb = dbMod.closeDb;
		const { createUser, createWorkshop } = await import('../src/lib/server/services/workshops');
		const { jobs } = await import('../src/lib/server/services/jobs');
		const { components, sheets } = await import('../src/lib/server/services/components');
		const { tests } = await import('../src/lib/server/services/tests');

		let address = 0;
		/** A workshop with a lead, one technician (signed in over HTTP) per device, and their readings. */
		async function workshop(label: string, readingsPerDevice: number) {
			const w = await createWorkshop(`${label} Auto Electrics (invented)`);
			const tag = uuidv7().slice(-8);
			const lead = await createUser(w.id, {
				email: `lead-${tag}@bench.example`,
				name: 'Lead Bench',
				role: 'lead',
				password: PASSWORD
			});
			const leadActor = {
				userId: lead.id,
				workshopId: w.id,
				role: 'lead' as const,
				deviceId: 'bench-setup'
			};
			const componentId = (
				await components.create(leadActor, { partNumber: `BX-${tag}`, kind: 'ignition_coil' })
			).id as string;
			const draft = await sheets.create(leadActor, { componentId, checks: COIL_CHECKS });
			const sheetId = draft.id as string;
			await sheets.update(
				leadActor,
				sheetId,
				draft.version as number,
				{},
				{
					serverFields: { state: 'approved', approvedBy: lead.id, approvedAt: new Date() }
				}
			);
			const [stored] = await dbMod
				.db()
				.query<{ checks: string }>('SELECT checks FROM spec_sheets WHERE id = ?', {
					replacements: [sheetId],
					type: QueryTypes.SELECT
				});
			const checks = JSON.parse(stored.checks) as CheckSpec[];
			const clients: Client[] = [];
			const batches: Batch[] = [];
			for (let d = 0; d < DEVICES; d++) {
				const email = `tech${d + 1}-${tag}@bench.example`;
				const tech = await createUser(w.id, {
					email,
					name: `Technician ${d + 1}`,
					role: 'technician',
					password: PASSWORD
				});
				const actor = {
					userId: tech.id,
					workshopId: w.id,
					role: 'technician' as const,
					deviceId: `bench-phone-${d + 1}`
				};
				const jobId = (
					await jobs.create(leadActor, {
						complaint: `Misfire on bench car ${d + 1}`,
						assigneeId: tech.id
					})
				).id as string;
				const testIds: string[] = [];
				for (const position of POSITIONS) {
					const t = await tests.create(actor, {
						jobId,
						componentId,
						sheetId,
						position,
						meter: METER,
						temperature: TEMPERATURE
					});
					testIds.push(t.id as string);
				}
				// Each device signs in from its own address (the sign-in throttle counts per address).
				const c = new Client(
					served.url,
					`10.88.${Math.floor(++address / 250)}.${address % 250}`
				);
				const r = await c.signIn(email, PASSWORD);
				if (r.status !== 303) throw new Error(`sign-in answered ${r.status}`);
				clients.push(c);
				const ops = readingsFor(d, readingsPerDevice, testIds, checks);
				for (let i = 0; i < ops.length; i += BATCH) {
					const slice = ops.slice(i, i + BATCH);
					const deviceId = actor.deviceId;
					batches.push({
						device: d,
						deviceId,
						ops: slice,
						body: JSON.stringify({ deviceId, ops: slice })
					});
				}
			}
			return { workshopId: w.id, clients, batches };
		}

		pool = mariadb.createPool({
			host: env.DB_HOST,
			port: Number(env.DB_PORT),
			user: env.DB_USER,
			password: env.DB_PASSWORD,
			database: env.DB_NAME,
			connectionLimit: DEVICES,
			dateStrings: true
		});
		await pool.query('CREATE TABLE readings_raw LIKE readings');

		/** The raw driver paths: one transaction per batch, the same batches as the pushes. */
		async function rawRun(
			path: RawPath,
			batches: { device: number; rows: Record<string, unknown>[] }[]
		) {
			await pool!.query('TRUNCATE TABLE readings_raw');
			// Not the generated stored change (the database writes it on either path).
			const generated = new Set(Object.values(STORED_CHANGE));
			const cols = Object.keys(batches[0].rows[0]).filter((c) => c !== 'created_at' && !generated.has(c));
			const tuple = `(${cols.map(() => '?').join(', ')}, UTC_TIMESTAMP(3))`;
			const lanes = path === 'multiParallel' ? DEVICES : 1;
			const conns = await Promise.all(Array.from({ length: lanes }, () => pool!.getConnection()));
			const latencies: number[] = [];
			const cpu0 = cpuOf(pids);
			const t0 = performance.now();
			try {
				await Promise.all(
					conns.map(async (conn, lane) => {
						for (const b of batches) {
							if (lanes > 1 && b.device % lanes !== lane) continue;
							const s = performance.now();
							await conn.beginTransaction();
							if (path === 'batch') {
								await conn.batch(
									`INSERT INTO readings_raw (${cols.join(', ')}, created_at) VALUES ${tuple}`,
									b.rows.map((r) => cols.map((c) => r[c]))
								);
							} else {
								await conn.query(
									`INSERT INTO readings_raw (${cols.join(', ')}, created_at) VALUES ${b.rows.map(() => tuple).join(', ')}`,
									b.rows.flatMap((r) => cols.map((c) => r[c]))
								);
							}
							await conn.commit();
							latencies.push(performance.now() - s);
						}
					})
				);
			} finally {
				for (const c of conns) await c.release();
			}
			const seconds = (performance.now() - t0) / 1000;
			const cpu = cpuSince(pids, cpu0);
			const [{ n }] = await pool!.query('SELECT COUNT(*) AS n FROM readings_raw');
			latencies.sort((a, b) => a - b);
			return {
				seconds,
				cpu,
				rows: Number(n),
				p50: percentile(latencies, 50),
				p95: percentile(latencies, 95)
			};
		}

		const count = async (sql: string, workshopId: string) =>
			Number(
				(
					await dbMod.db().query<{ n: number | bigint }>(sql, {
						replacements: [workshopId],
						type: QueryTypes.SELECT
					})
				)[0].n
			);
		const tally = async (w: string) => ({
			readings: await count('SELECT COUNT(*) AS n FROM readings WHERE workshop_id = ?', w),
			ledger: await count('SELECT COUNT(*) AS n FROM sync_ops WHERE workshop_id = ?', w),
			changes: await count('SELECT COUNT(*) AS n FROM changes WHERE workshop_id = ?', w),
			mismatches: await count(
				'SELECT COUNT(*) AS n FROM reading_mismatches WHERE workshop_id = ?',
				w
			),
			lastSeq: await count('SELECT last_seq AS n FROM change_counters WHERE workshop_id = ?', w)
		});
		const storedBatches = async (w: string, batches: Batch[]) => {
			const stored: Record<string, unknown>[] = await pool!.query(
				'SELECT * FROM readings WHERE workshop_id = ? ORDER BY seq',
				[w]
			);
			const byOp = new Map(stored.map((r) => [String(r.op_id), r]));
			return batches.map((b) => ({ device: b.device, rows: b.ops.map((o) => byOp.get(o.opId)!) }));
		};

		if (WARMUP) {
			const warm = await workshop('Warm-up', WARMUP);
			await pushAll(warm.clients, warm.batches, pids);
			await pushAll(warm.clients, warm.batches, pids);
			const rows = await storedBatches(warm.workshopId, warm.batches);
			for (const path of Object.keys(RAW_LABELS) as RawPath[]) await rawRun(path, rows);
		}

		const perDevice = Math.ceil(READINGS / DEVICES);
		const rounds: Round[] = [];
		let total = 0;
		for (let round = 1; round <= ROUNDS; round++) {
			const w = await workshop(`Round ${round}`, perDevice);
			total = w.batches.reduce((n, b) => n + b.ops.length, 0);
			if (round === 1) {
				const maxBody = Math.max(...w.batches.map((b) => b.body.length));
				console.log(
					`\n${ROUNDS} round(s), each: ${fmt(total)} readings from ${DEVICES} devices at once, ` +
						`${w.batches.length} pushes of up to ${BATCH} (largest body ${fmt(maxBody / 1024)} KiB)`
				);
			}
			const before = await tally(w.workshopId);
			const push = await pushAll(w.clients, w.batches, pids);
			const afterPush = await tally(w.workshopId);
			const statuses = [...push.results.values()].map((r) => r.status);
			check(
				push.results.size === total && statuses.every((s) => s === 'applied'),
				`round ${round}: every op answered applied (${fmt(statuses.filter((s) => s === 'applied').length)} of ${fmt(total)})`
			);
			check(
				afterPush.readings - before.readings === total,
				`round ${round}: ${fmt(afterPush.readings - before.readings)} readings stored, ${fmt(total)} expected`
			);
			check(
				afterPush.lastSeq - before.lastSeq === total,
				`round ${round}: the feed moved by ${fmt(afterPush.lastSeq - before.lastSeq)} seqs`
			);

			const replay = await pushAll(w.clients, w.batches, pids);
			const afterReplay = await tally(w.workshopId);
			const dup = [...replay.results.values()].filter(
				(r) => r.status === 'duplicate' && r.firstStatus === 'applied'
			).length;
			check(
				dup === total,
				`round ${round}: every replayed op answered duplicate of applied (${fmt(dup)})`
			);
			check(
				JSON.stringify(afterReplay) === JSON.stringify(afterPush),
				`round ${round}: the replay stored nothing`
			);

			const rows = await storedBatches(w.workshopId, w.batches);
			const raw = {} as Record<RawPath, Phase>;
			for (const path of Object.keys(RAW_LABELS) as RawPath[]) {
				const r = await rawRun(path, rows);
				check(r.rows === total, `round ${round}: ${RAW_LABELS[path]} stored ${fmt(r.rows)} rows`);
				raw[path] = r;
			}
			rounds.push({ push, replay, raw, mismatches: afterPush.mismatches - before.mismatches });
			const rate = (p: Phase) => fmt(total / p.seconds);
			console.log(
				`  round ${round}: push ${rate(push)} rows/s, replay ${rate(replay)}, raw ${(Object.keys(raw) as RawPath[]).map((k) => rate(raw[k])).join(' / ')}`
			);
		}

		// Medians over the rounds.
		const med = (pick: (r: Round) => Phase): Phase & { rate: number } => {
			const phases = rounds.map(pick);
			const m = (f: (p: Phase) => number) => median(phases.map(f));
			return {
				rate: median(phases.map((p) => total / p.seconds)),
				seconds: m((p) => p.seconds),
				p50: m((p) => p.p50),
				p95: m((p) => p.p95),
				cpu: { app: m((p) => p.cpu.app), db: m((p) => p.cpu.db), bench: m((p) => p.cpu.bench) }
			};
		};
		const push = med((r) => r.push);
		const replay = med((r) => r.replay);
		const raw = Object.fromEntries(
			(Object.keys(RAW_LABELS) as RawPath[]).map((k) => [k, med((r) => r.raw[k])])
		) as Record<RawPath, ReturnType<typeof med>>;
		const oneConn = raw.multi.rate >= raw.batch.rate ? raw.multi : raw.batch;
		const ratio = push.rate / oneConn.rate;
		const line = (label: string, r: ReturnType<typeof med>) =>
			console.log(
				`  ${label.padEnd(40)} ${fmt(r.rate).padStart(7)} rows/s  p50 ${fmt(r.p50, 1).padStart(5)} ms  ` +
					`p95 ${fmt(r.p95, 1).padStart(5)} ms per batch   CPU s: app ${fmt(r.cpu.app, 2)}, ` +
					`db ${fmt(r.cpu.db, 2)}, bench ${fmt(r.cpu.bench, 2)}`
			);
		console.log(
			`\nMedians of ${ROUNDS} round(s) (${new Date().toISOString().slice(0, 10)}, ${os.cpus().length} cores, ` +
				`${fmt(total)} readings per round, ${DEVICES} devices, batches of ${BATCH}, ` +
				`${workers} app process${workers > 1 ? 'es' : ''}, ` +
				`${fmt(median(rounds.map((r) => r.mismatches)))} mismatches):`
		);
		line('endpoint push (HTTP, every check)', push);
		line('endpoint replay (all duplicate)', replay);
		for (const k of Object.keys(RAW_LABELS) as RawPath[]) line(RAW_LABELS[k], raw[k]);
		console.log(
			`  endpoint / fastest one-connection raw path = ${fmt(ratio, 2)} ` +
				`(goal ≥ ${GOAL}: ${ratio >= GOAL ? 'met' : 'NOT met'}); ` +
				`endpoint / raw on ${DEVICES} connections = ${fmt(push.rate / raw.multiParallel.rate, 2)}`
		);
		// Paired per round (push and raw ran minutes apart at most, on the same machine state).
		const perRound = rounds
			.map((r) => r.push.seconds ** -1 / Math.max(r.raw.multi.seconds ** -1, r.raw.batch.seconds ** -1))
			.sort((a, b) => a - b);
		console.log(
			`  per round, endpoint / fastest one-connection raw path: median ${fmt(median(perRound), 2)}, ` +
				`from ${fmt(perRound[0], 2)} to ${fmt(perRound[perRound.length - 1], 2)} ` +
				`(${perRound.map((x) => fmt(x, 2)).join(', ')})`
		);
		console.log(
			failures.length ? `\n${failures.length} check(s) failed.` : '\nAll counts checked.'
		);
	} finally {
		for (const a of agents.values()) a.destroy();
		if (pool) await pool.end();
		if (closeDb) await closeDb();
		for (const a of apps) stopServe(a);
		await mariaDb.stop();
	}
	if (failures.length) process.exitCode = 1;
}

main().catch((e) => {
	console.error(e);
	process.exitCode = 1;
});
