/**
 * Fieldbench past one machine, on loopback: a three-node MariaDB Galera cluster, two or more
 * app servers, and HAProxy in front of both (Debian's `galera-4`, `rsync` and `haproxy`).
 *
 *   phones ──▶ HAProxy :LB (HTTP, health check GET /api/health) ──▶ app 1 … app N
 *   app N  ──▶ HAProxy :DB (TCP) ──▶ one Galera node writes, the other two stand by
 *
 * Steps of `startCluster()`:
 *  1. install what is missing (root: apt-get; otherwise the exact command is printed);
 *  2. pick free ports, write one defaults file per node under .data/cluster/;
 *  3. start the nodes: when none runs, the one Galera marks safe to bootstrap (or node 1 on a
 *     fresh cluster) starts a new cluster and the others join it (state transfer by rsync);
 *     running nodes are kept;
 *  4. create the database, the app user and HAProxy's check user, migrate, seed the demo;
 *  5. start HAProxy, then the app servers (scripts/serve.js, one process each) pointed at
 *     HAProxy's database port, and wait until the balancer answers /api/health.
 *
 * Why one writing node (docs/scaling.md): every write takes the workshop's change-feed
 * counter row, and Galera certifies a transaction at commit against every other node's, so
 * two nodes writing one workshop at once abort one of them. The database balancer sends all
 * connections to one node (the others are `backup` servers it fails over to), and the write
 * paths retry a transaction that loses certification or its node (the sync push is
 * idempotent by op id, so a retry never stores twice).
 *
 * Everything lives in .data/cluster/ (git-ignored); state.json records the ports.
 */
import { execFileSync, spawn, spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync, rmSync, writeFileSync, openSync } from 'node:fs';
import path from 'node:path';
import { mailEnv, startMailServer, stopMailServer } from './mail';
import { s3Env, startS3Server, stopS3Server } from './s3';
import { APP_PASSWORD, APP_USER, freePort, portFree, ROOT } from './mariadb';
import { alive, readPid } from './pid';

export const CLUSTER_DIR = path.join(ROOT, '.data', 'cluster');
const STATE = path.join(CLUSTER_DIR, 'state.json');
const PROVIDER = '/usr/lib/galera/libgalera_smm.so';
const DB_NAME = process.env.DB_NAME ?? 'fieldbench';
const tag = createHash('sha1').update(ROOT).digest('hex').slice(0, 8);
const isRoot = process.getuid?.() === 0;
export const NODES = 3;
export const APPS = Math.max(1, Number(process.env.CLUSTER_APPS ?? 2));

export type ClusterState = {
	nodes: { name: string; sql: number; galera: number; ist: number; sst: number }[];
	apps: number[];
	lb: number;
	dbLb: number;
	stats: number;
};

const bin = (name: string) =>
	['/usr/sbin', '/usr/bin'].map((d) => path.join(d, name)).find((p) => existsSync(p)) ?? null;

/** Install galera-4, rsync and haproxy when missing (MariaDB itself comes from mariadb.ts). */
export function ensureClusterPackages(): void {
	const need: string[] = [];
	if (!existsSync(PROVIDER)) need.push('galera-4');
	if (!bin('rsync')) need.push('rsync');
	if (!bin('haproxy')) need.push('haproxy');
	if (!bin('mariadbd')) need.push('mariadb-server');
	if (!need.length) return;
	if (!isRoot)
		throw new Error(`Missing ${need.join(', ')}. Run as root:  apt-get update && apt-get install -y ${need.join(' ')}`);
	console.log(`Installing ${need.join(', ')} from Debian packages…`);
	const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' };
	execFileSync('apt-get', ['update', '-qq'], { stdio: 'inherit', env });
	execFileSync('apt-get', ['install', '-y', '-qq', ...need], { stdio: 'inherit', env });
	spawnSync('service', ['mariadb', 'stop'], { stdio: 'ignore' });
	spawnSync('service', ['haproxy', 'stop'], { stdio: 'ignore' });
}

/**
 * Each node's folder (.data/cluster/nodeN/) holds its data, pid file and error log. As root
 * the nodes run as Debian's `mysql` user, who owns the folder: the rsync daemon that receives
 * a state transfer drops root for `nobody` unless told otherwise, and then cannot write.
 */
const runDir = (i: number) => path.join(CLUSTER_DIR, `node${i + 1}`);
const nodeDir = (i: number) => path.join(runDir(i), 'data');
const errOf = (i: number) => path.join(runDir(i), 'mariadbd.err');
const cnfOf = (i: number) => path.join(CLUSTER_DIR, `node${i + 1}.cnf`);
const pidOf = (i: number) => path.join(runDir(i), 'mariadbd.pid');
const RUN_AS = isRoot ? ['--user=mysql'] : [];
const socketOf = (i: number) => `/tmp/fieldbench-${tag}-n${i + 1}.sock`;

export function readState(): ClusterState | null {
	return existsSync(STATE) ? (JSON.parse(readFileSync(STATE, 'utf8')) as ClusterState) : null;
}

async function newState(): Promise<ClusterState> {
	const taken = new Set<number>();
	const next = async (from: number) => {
		let p = from;
		for (;;) {
			p = await freePort(p);
			if (!taken.has(p)) break;
			p++;
		}
		taken.add(p);
		return p;
	};
	const nodes = [];
	for (let i = 0; i < NODES; i++) {
		nodes.push({
			name: `node${i + 1}`,
			sql: await next(3411 + i),
			galera: await next(4567 + i * 10),
			ist: await next(4568 + i * 10),
			sst: await next(4444 + i * 10)
		});
	}
	const apps = [];
	for (let i = 0; i < APPS; i++) apps.push(await next(3201 + i));
	return { nodes, apps, lb: await next(Number(process.env.PORT ?? 3100)), dbLb: await next(3410), stats: await next(8404) };
}

function writeNodeCnf(s: ClusterState, i: number) {
	const n = s.nodes[i];
	const peers = s.nodes.map((x) => `127.0.0.1:${x.galera}`).join(',');
	writeFileSync(
		cnfOf(i),
		[
			'[mysqld]',
			`datadir=${nodeDir(i)}`,
			`socket=${socketOf(i)}`,
			`pid-file=${pidOf(i)}`,
			`log-error=${errOf(i)}`,
			`port=${n.sql}`,
			'bind-address=127.0.0.1',
			'skip-name-resolve',
			'character-set-server=utf8mb4',
			'collation-server=utf8mb4_unicode_ci',
			'default-time-zone=+00:00',
			'max_connections=300',
			// Durable commits on every node (a commit acknowledged to a phone survives a power cut).
			'innodb_flush_log_at_trx_commit=1',
			'sync_binlog=1',
			// What Galera needs: row-based replication, InnoDB, interleaved auto-increment locks.
			'binlog_format=ROW',
			// The jobs' closed_at triggers are created by the app's own account during migrations;
			// with replication on, MariaDB asks for SUPER unless trigger creators are trusted.
			'log_bin_trust_function_creators=1',
			'default_storage_engine=InnoDB',
			'innodb_autoinc_lock_mode=2',
			'innodb_buffer_pool_size=128M',
			'wsrep_on=ON',
			`wsrep_provider=${PROVIDER}`,
			'wsrep_cluster_name=fieldbench',
			`wsrep_cluster_address=gcomm://${peers}`,
			`wsrep_node_name=${n.name}`,
			`wsrep_node_address=127.0.0.1:${n.galera}`,
			`wsrep_provider_options="gmcast.listen_addr=tcp://127.0.0.1:${n.galera};ist.recv_addr=127.0.0.1:${n.ist};gcache.size=128M"`,
			'wsrep_sst_method=rsync',
			`wsrep_sst_receive_address=127.0.0.1:${n.sst}`,
			// A transaction that loses certification is retried by the server once before the
			// client sees the deadlock error (autocommit statements only); ours retry themselves.
			'wsrep_retry_autocommit=3',
			'',
			'[client]',
			`socket=${socketOf(i)}`,
			`port=${n.sql}`,
			'host=127.0.0.1',
			'user=root',
			''
		].join('\n')
	);
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** Run SQL on node `i` as root over its socket; returns the rows as tab-separated text. */
export function nodeSql(i: number, sql: string): string {
	const r = spawnSync(bin('mariadb')!, [`--defaults-file=${cnfOf(i)}`, '--protocol=SOCKET', '-N', '-B', '-e', sql], {
		encoding: 'utf8',
		timeout: 60_000,
		maxBuffer: 512 * 1024 * 1024
	});
	if (r.status !== 0) throw new Error(`node${i + 1}: ${r.error?.message ?? r.stderr.trim()}`);
	return r.stdout.trim();
}

function wsrep(i: number, name: string): string | null {
	try {
		return nodeSql(i, `SHOW GLOBAL STATUS LIKE '${name}'`).split('\t')[1] ?? null;
	} catch {
		return null;
	}
}

export function nodeRunning(i: number): boolean {
	return alive(readPid(pidOf(i)));
}

/** Whether node `i` is a synced member of the primary component. */
export function nodeSynced(i: number): boolean {
	return nodeRunning(i) && wsrep(i, 'wsrep_local_state_comment') === 'Synced' && wsrep(i, 'wsrep_ready') === 'ON';
}

export function clusterSize(i = 0): number {
	for (let k = 0; k < NODES; k++) {
		const j = (i + k) % NODES;
		if (nodeRunning(j)) return Number(wsrep(j, 'wsrep_cluster_size') ?? 0);
	}
	return 0;
}

function grastate(i: number): { safe: boolean; seqno: number } {
	const f = path.join(nodeDir(i), 'grastate.dat');
	if (!existsSync(f)) return { safe: false, seqno: -1 };
	const t = readFileSync(f, 'utf8');
	return {
		safe: /safe_to_bootstrap:\s*1/.test(t),
		seqno: Number(/seqno:\s*(-?\d+)/.exec(t)?.[1] ?? -1)
	};
}

/** Start node `i`; `bootstrap` starts a new cluster from it. Waits until it is synced. */
export async function startNode(i: number, bootstrap = false): Promise<void> {
	const s = readState()!;
	writeNodeCnf(s, i);
	if (nodeRunning(i)) return;
	rmSync(pidOf(i), { force: true });
	const dir = nodeDir(i);
	if (!existsSync(path.join(dir, 'mysql'))) {
		mkdirSync(dir, { recursive: true });
		if (bootstrap) {
			execFileSync(
				bin('mariadb-install-db')!,
				[`--defaults-file=${cnfOf(i)}`, `--datadir=${dir}`, ...RUN_AS, '--auth-root-authentication-method=normal', '--skip-test-db'],
				{ stdio: 'ignore' }
			);
		}
	}
	if (isRoot) execFileSync('chown', ['-R', 'mysql:mysql', runDir(i)]);
	if (bootstrap) {
		// Galera refuses to bootstrap from a node that was not the last to leave unless told.
		const f = path.join(dir, 'grastate.dat');
		if (existsSync(f)) writeFileSync(f, readFileSync(f, 'utf8').replace(/safe_to_bootstrap:\s*0/, 'safe_to_bootstrap: 1'));
	}
	const log = openSync(path.join(CLUSTER_DIR, `node${i + 1}.out`), 'a');
	const where = `see ${errOf(i)}`;
	const child = spawn(
		bin('mariadbd')!,
		[`--defaults-file=${cnfOf(i)}`, ...RUN_AS, ...(bootstrap ? ['--wsrep-new-cluster'] : [])],
		{ detached: true, stdio: ['ignore', log, log], env: { ...process.env, PATH: `${process.env.PATH}:/usr/sbin:/usr/bin` } }
	);
	child.unref();
	for (let t = 0; t < 1200; t++) {
		if (child.exitCode !== null || !alive(child.pid ?? null))
			throw new Error(`node${i + 1} ended while starting; ${where}`);
		if (nodeSynced(i)) return;
		await sleep(250);
	}
	throw new Error(`node${i + 1} did not join within 5 minutes; ${where}`);
}

/** Stop node `i` cleanly (or kill it: SIGKILL, as a crash). */
export async function stopNode(i: number, kill = false): Promise<void> {
	const pid = readPid(pidOf(i));
	if (!alive(pid)) return;
	if (kill) process.kill(pid!, 'SIGKILL');
	else spawnSync(bin('mariadb-admin')!, [`--defaults-file=${cnfOf(i)}`, '--protocol=SOCKET', 'shutdown'], { stdio: 'ignore', timeout: 60_000 });
	const port = readState()!.nodes[i].sql;
	for (let t = 0; t < 600; t++) {
		if (!alive(pid) && (await portFree(port))) {
			rmSync(pidOf(i), { force: true });
			return;
		}
		await sleep(100);
	}
	throw new Error(`node${i + 1} did not stop`);
}

/** Start every node that is not running; bootstrap when none is. */
async function startNodes() {
	const running = [...Array(NODES).keys()].filter(nodeRunning);
	if (!running.length) {
		const states = [...Array(NODES).keys()].map(grastate);
		let first = states.findIndex((g) => g.safe);
		if (first < 0) first = states.reduce((best, g, i) => (g.seqno > states[best].seqno ? i : best), 0);
		console.log(`Galera: node${first + 1} starts the cluster`);
		await startNode(first, true);
	}
	for (let i = 0; i < NODES; i++) {
		if (!nodeRunning(i)) {
			console.log(`Galera: node${i + 1} joins`);
			await startNode(i);
		}
	}
}

function firstRunningNode(): number {
	const i = [...Array(NODES).keys()].find(nodeSynced);
	if (i === undefined) throw new Error('no Galera node is running');
	return i;
}

function writeHaproxyCfg(s: ClusterState) {
	const apps = s.apps
		.map((p, i) => `    server app${i + 1} 127.0.0.1:${p} check inter 500ms fall 2 rise 2`)
		.join('\n');
	const nodes = s.nodes
		.map((n, i) => `    server ${n.name} 127.0.0.1:${n.sql} check inter 500ms fall 2 rise 3${i === 0 ? ' on-marked-up shutdown-backup-sessions' : ' backup'}`)
		.join('\n');
	writeFileSync(
		path.join(CLUSTER_DIR, 'haproxy.cfg'),
		`# Written by scripts/lib/cluster.ts; see docs/scaling.md.
global
    maxconn 4000
    pidfile ${path.join(CLUSTER_DIR, 'haproxy.pid')}

defaults
    timeout connect 2s
    timeout client 120s
    timeout server 120s
    retries 2

# The app servers: round robin, health from /api/health (200 only with the database up and
# migrated). A request that cannot connect goes to the other server; one that reached an app
# server that then died is answered 502 and the phone sends it again (pushes are idempotent).
frontend app
    mode http
    bind 127.0.0.1:${s.lb}
    option forwardfor
    default_backend apps

backend apps
    mode http
    balance roundrobin
    option redispatch
    retry-on conn-failure empty-response
    option httpchk
    # The app answers only requests for its own address (421 otherwise): the check names the balancer's.
    http-check send meth GET uri /api/health ver HTTP/1.1 hdr Host localhost:${s.lb}
    http-check expect status 200
${apps}

# The database: one writing node at a time, the others stand by (\`backup\`). A node that
# stops answering MySQL's handshake is dropped within about a second.
listen galera
    mode tcp
    bind 127.0.0.1:${s.dbLb}
    option mysql-check user haproxy_check
    default-server on-marked-down shutdown-sessions
${nodes}

listen stats
    mode http
    bind 127.0.0.1:${s.stats}
    stats enable
    stats uri /
`
	);
}

async function startHaproxy(s: ClusterState) {
	const pidFile = path.join(CLUSTER_DIR, 'haproxy.pid');
	const old = readPid(pidFile);
	if (alive(old)) process.kill(old!, 'SIGTERM');
	await sleep(200);
	writeHaproxyCfg(s);
	const r = spawnSync(bin('haproxy')!, ['-D', '-f', path.join(CLUSTER_DIR, 'haproxy.cfg')], { encoding: 'utf8' });
	if (r.status !== 0) throw new Error(`haproxy: ${r.stderr}`);
}

const appPidFile = (i: number) => path.join(CLUSTER_DIR, `app${i + 1}.pid`);
const appBuildFile = (i: number) => path.join(CLUSTER_DIR, `app${i + 1}.build`);
const BUILD_STAMP = path.join(ROOT, 'build', '.built');
const currentBuild = () => (existsSync(BUILD_STAMP) ? readFileSync(BUILD_STAMP, 'utf8') : '');
const appBuild = (i: number) => (existsSync(appBuildFile(i)) ? readFileSync(appBuildFile(i), 'utf8') : '');

export function appRunning(i: number): boolean {
	return alive(readPid(appPidFile(i)));
}

/** Start app server `i` (scripts/serve.js, one process) against the database balancer. */
export async function startApp(i: number): Promise<void> {
	const s = readState()!;
	if (appRunning(i)) return;
	const port = s.apps[i];
	const log = openSync(path.join(CLUSTER_DIR, `app${i + 1}.log`), 'a');
	// Every app server sends through one fake mail server unless a real one is configured.
	const mail = process.env.SMTP_HOST ? null : await startMailServer('fieldbench-cluster');
	// …and keep photos in one photo store unless a real one is configured.
	const store = process.env.S3_BUCKET ? null : await startS3Server('fieldbench-cluster');
	const child = spawn(process.execPath, [path.join(ROOT, 'scripts', 'serve.js')], {
		cwd: ROOT,
		detached: true,
		stdio: ['ignore', log, log],
		env: {
			...process.env,
			WEB_CONCURRENCY: process.env.WEB_CONCURRENCY ?? '1',
			HOST: '127.0.0.1',
			PORT: String(port),
			ADDRESS_HEADER: 'x-forwarded-for',
			XFF_DEPTH: '1',
			BODY_SIZE_LIMIT: '12M',
			MIGRATIONS_DIR: path.join(ROOT, 'migrations'),
			DB_HOST: '127.0.0.1',
			DB_PORT: String(s.dbLb),
			DB_NAME,
			DB_USER: APP_USER,
			DB_PASSWORD: APP_PASSWORD,
			...(mail ? mailEnv(mail.port, mail.dir) : {}),
			...(store ? s3Env(store.port) : {})
		}
	});
	child.unref();
	writeFileSync(appPidFile(i), String(child.pid));
	writeFileSync(appBuildFile(i), currentBuild());
	for (let t = 0; t < 300; t++) {
		try {
			const r = await fetch(`http://127.0.0.1:${port}/api/health`);
			if (r.status === 200) return;
		} catch {
			/* not up yet */
		}
		if (child.exitCode !== null) throw new Error(`app ${i + 1} ended; see ${path.join(CLUSTER_DIR, `app${i + 1}.log`)}`);
		await sleep(100);
	}
	throw new Error(`app ${i + 1} did not answer within 30 s`);
}

/** Stop app server `i` (its whole process group); `kill` is SIGKILL, as a crash. */
export async function stopApp(i: number, kill = false): Promise<void> {
	const pid = readPid(appPidFile(i));
	if (!alive(pid)) return;
	try {
		process.kill(-pid!, kill ? 'SIGKILL' : 'SIGTERM');
	} catch {
		/* gone */
	}
	const port = readState()!.apps[i];
	for (let t = 0; t < 400; t++) {
		if (!alive(pid) && (await portFree(port))) break;
		await sleep(100);
	}
	rmSync(appPidFile(i), { force: true });
}

/** The whole cluster up (reusing what runs); returns the balancer's URL. */
export async function startCluster(): Promise<{ url: string; state: ClusterState }> {
	ensureClusterPackages();
	mkdirSync(CLUSTER_DIR, { recursive: true });
	let s = readState();
	const anyRunning = s && [...Array(NODES).keys()].some(nodeRunning);
	if (!s || (!anyRunning && !(await portsFree(s)))) {
		s = await newState();
		writeFileSync(STATE, JSON.stringify(s, null, 2));
	}
	for (let i = 0; i < NODES; i++) writeNodeCnf(s, i);
	await startNodes();
	const w = firstRunningNode();
	const pw = APP_PASSWORD.replace(/'/g, "''");
	nodeSql(
		w,
		[
			`CREATE DATABASE IF NOT EXISTS \`${DB_NAME}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`,
			`CREATE USER IF NOT EXISTS '${APP_USER}'@'127.0.0.1' IDENTIFIED BY '${pw}'`,
			`CREATE USER IF NOT EXISTS '${APP_USER}'@'localhost' IDENTIFIED BY '${pw}'`,
			`GRANT ALL PRIVILEGES ON \`${DB_NAME}\`.* TO '${APP_USER}'@'127.0.0.1'`,
			`GRANT ALL PRIVILEGES ON \`${DB_NAME}\`.* TO '${APP_USER}'@'localhost'`,
			`CREATE USER IF NOT EXISTS 'haproxy_check'@'127.0.0.1'`
		].join('; ')
	);
	await startHaproxy(s);
	Object.assign(process.env, {
		DB_HOST: '127.0.0.1',
		DB_PORT: String(s.dbLb),
		DB_NAME,
		DB_USER: APP_USER,
		DB_PASSWORD: APP_PASSWORD
	});
	await waitFor(async () => {
		try {
			const { migrate } = await import('./app');
			const n = await migrate();
			if (n) console.log(`Migrations: ${n} applied.`);
			return true;
		} catch {
			return false;
		}
	}, 30_000);
	const { seedDemo } = await import('../../src/lib/server/seed/demo');
	const { closeDb } = await import('../../src/lib/server/db');
	await seedDemo();
	await closeDb();
	const { buildIfNeeded } = await import('./app');
	// A new build replaces the files the running app servers load lazily: restart the ones
	// that run an older build.
	buildIfNeeded();
	for (let i = 0; i < s.apps.length; i++) {
		if (appRunning(i) && appBuild(i) !== currentBuild()) await stopApp(i);
		await startApp(i);
	}
	const url = `http://localhost:${s.lb}`;
	await waitFor(async () => {
		try {
			return (await fetch(`${url}/api/health`)).status === 200;
		} catch {
			return false;
		}
	}, 30_000);
	return { url, state: s };
}

async function portsFree(s: ClusterState) {
	for (const n of s.nodes) for (const p of [n.sql, n.galera, n.ist, n.sst]) if (!(await portFree(p))) return false;
	return true;
}

async function waitFor(test: () => Promise<boolean>, ms: number) {
	const end = Date.now() + ms;
	while (Date.now() < end) {
		if (await test()) return;
		await sleep(250);
	}
	throw new Error('timed out');
}

/** Everything down: the app servers, HAProxy, then the nodes last-to-first. */
export async function stopCluster(): Promise<void> {
	const s = readState();
	if (!s) return;
	for (let i = 0; i < s.apps.length; i++) await stopApp(i);
	const hp = readPid(path.join(CLUSTER_DIR, 'haproxy.pid'));
	if (alive(hp)) process.kill(hp!, 'SIGTERM');
	for (let i = NODES - 1; i >= 0; i--) await stopNode(i);
	await stopMailServer('fieldbench-cluster');
	await stopS3Server('fieldbench-cluster');
}

/** One line per part: what runs where. */
export function clusterStatus(): string[] {
	const s = readState();
	if (!s) return ['The cluster has never been started (npm run cluster:start).'];
	const lines = s.nodes.map((n, i) => {
		if (!nodeRunning(i)) return `${n.name}  127.0.0.1:${n.sql}  stopped`;
		return `${n.name}  127.0.0.1:${n.sql}  ${wsrep(i, 'wsrep_local_state_comment') ?? '?'}, cluster size ${wsrep(i, 'wsrep_cluster_size') ?? '?'}`;
	});
	s.apps.forEach((p, i) => lines.push(`app${i + 1}   127.0.0.1:${p}  ${appRunning(i) ? 'running' : 'stopped'}`));
	const hp = alive(readPid(path.join(CLUSTER_DIR, 'haproxy.pid')));
	lines.push(`balancer http://localhost:${s.lb} (database 127.0.0.1:${s.dbLb}, stats http://127.0.0.1:${s.stats}/)  ${hp ? 'running' : 'stopped'}`);
	return lines;
}
