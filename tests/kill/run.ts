/**
 * `npm run test:kill` — nothing is lost when app servers die mid-sync and MariaDB restarts.
 *
 * 1. a throw-away MariaDB (its own data directory and port), migrated, with an invented
 *    workshop; two app servers (`scripts/serve.js`, each in its own process group) on two
 *    ports sharing it;
 * 2. four simulated phones — the browser's sync client over its own fake IndexedDB, signed
 *    in as two technicians, a lead and an owner — write tests, readings, spark tests and job
 *    and test edits while syncing through a pretend load balancer;
 * 3. meanwhile app servers are SIGKILLed (their whole process group) at random moments and
 *    started again, and MariaDB is killed (SIGKILL) or stopped and started a few times;
 * 4. then everything comes up, every phone drains its outbox and pulls, and `verify.ts`
 *    checks the ledger, the change feed and every phone's copy against MariaDB.
 *
 * Prints one line, e.g. `kills 50, ops 12000, stored 12000, lost 0, duplicated 0, converged 4/4`,
 * and exits non-zero on any loss or difference. Knobs (environment): KILL_KILLS (50),
 * KILL_DB_RESTARTS (3), KILL_OPS_PER_PHONE (3000: a phone stops writing there), KILL_SEED
 * (random; printed, so a run can be repeated), KILL_GAP_MS (largest pause between kills, 2500).
 * Server logs go to test-results/kill/.
 */
import { mkdirSync, rmSync } from 'node:fs';
import path from 'node:path';
import { buildIfNeeded, migrate } from '../../scripts/lib/app';
import { ROOT } from '../../scripts/lib/mariadb';
import { ScratchMariaDb } from '../../scripts/lib/mariadb-scratch';
import { Phone, sleep } from './phone';
import { makeRng } from './rng';
import { balancer, startServers, type AppServer } from './servers';
import { failed, verify } from './verify';

const num = (name: string, fallback: number) => (process.env[name] ? Number(process.env[name]) : fallback);
const KILLS = num('KILL_KILLS', 50);
const DB_RESTARTS = num('KILL_DB_RESTARTS', 3);
const OPS_PER_PHONE = num('KILL_OPS_PER_PHONE', 3000);
const GAP_MS = num('KILL_GAP_MS', 2500);
const SEED = num('KILL_SEED', Math.floor(Math.random() * 2 ** 31));
const LOGS = path.join(ROOT, 'test-results', 'kill');

const rng = makeRng(SEED);
const started = Date.now();
const say = (s: string) => console.log(`[kill ${((Date.now() - started) / 1000).toFixed(1)} s] ${s}`);

/**
 * Kill app servers at random moments (and MariaDB now and then) until `KILLS` kills are done.
 * Most kills wait until the victim is busy with a request, then a random moment more, so they
 * land mid-push or mid-pull; a killed server starts again after a pause, in the background.
 */
async function storm(servers: AppServer[], maria: ScratchMariaDb, stopped: () => boolean) {
	let kills = 0;
	let restarts = 0;
	const restartAt = new Set(Array.from({ length: DB_RESTARTS }, (_, i) => Math.floor(((i + 1) * KILLS) / (DB_RESTARTS + 1))));
	const starting: Promise<void>[] = [];
	while (kills < KILLS && !stopped()) {
		await sleep(rng.int(100, GAP_MS));
		if (restartAt.has(kills)) {
			restartAt.delete(kills);
			const hard = restarts % 2 === 0;
			say(`MariaDB ${hard ? 'killed (SIGKILL)' : 'stopped'}`);
			await (hard ? maria.kill() : maria.stop());
			await sleep(rng.int(300, 2000));
			await maria.start();
			restarts++;
			say('MariaDB up again');
		}
		const up = servers.filter((s) => s.up);
		if (!up.length) continue;
		const victims = rng.next() < 0.15 ? up : [rng.pick(up)];
		if (rng.next() < 0.7) {
			for (let waited = 0; waited < 1500 && !victims.some((s) => s.inflight > 0); waited += 5) await sleep(5);
			await sleep(rng.int(0, 150));
		}
		for (const s of victims) {
			s.kill();
			kills++;
			starting.push(sleep(rng.int(0, 1500)).then(() => s.start()));
		}
		if (kills % 10 < victims.length) say(`${kills} kills`);
	}
	await Promise.all(starting);
	return { kills, restarts };
}

async function main(): Promise<number> {
	say(`seed ${SEED}: ${KILLS} kills, ${DB_RESTARTS} MariaDB restarts, up to ${OPS_PER_PHONE} ops per phone`);
	rmSync(LOGS, { recursive: true, force: true });
	mkdirSync(LOGS, { recursive: true });
	buildIfNeeded();
	const maria = new ScratchMariaDb('kill');
	let servers: AppServer[] = [];
	// Whatever ends this process (an error, Ctrl-C, a closed pipe), the servers and MariaDB go too.
	const cleanUp = () => {
		for (const s of servers) s.kill();
		maria.destroyNow();
	};
	process.once('exit', cleanUp);
	for (const sig of ['SIGINT', 'SIGTERM', 'SIGHUP', 'SIGPIPE'] as const) process.once(sig, () => process.exit(130));
	try {
		await maria.init();
		const env = maria.createDatabase('fieldbench_kill');
		Object.assign(process.env, env);
		await migrate();
		const { makeWorld } = await import('./world');
		const { closeDb } = await import('../../src/lib/server/db');
		const { workshopId, users, world } = await makeWorld();
		await closeDb(); // the database is about to be killed; reconnect for the checks
		servers = await startServers(env, LOGS);
		const pick = balancer(servers, rng);
		const phones = users.map((u) => new Phone(u, world, pick, rng));
		await Promise.all(phones.map((p) => p.start()));
		say(`servers on ${servers.map((s) => s.port).join(' and ')}; ${phones.length} phones signed in`);

		let calm = false;
		let broken: unknown = null;
		const stopOn = (e: unknown) => {
			broken ??= e;
			calm = true;
		};
		const writers = phones.map(async (p) => {
			while (!calm && p.made.length < OPS_PER_PHONE) {
				await p.work();
				await sleep(rng.int(20, 300));
			}
		});
		const syncers = phones.map((p) => p.syncLoop(() => calm));
		const work = Promise.all([...writers, ...syncers]).catch(stopOn);
		const { kills, restarts } = await storm(servers, maria, () => calm);
		calm = true;
		await work;
		if (broken) throw broken;
		say('storm over; draining every outbox');
		await Promise.all(servers.filter((s) => !s.up).map((s) => s.start()));
		for (const p of phones) await p.drain();
		for (const p of phones) await p.syncOnce(); // everyone pulls what the others sent last

		const v = await verify(workshopId, phones, (cookie) => (url, init = {}) => {
			const base = pick().url;
			const headers = new Headers(init.headers);
			headers.set('cookie', cookie);
			return fetch(base + url, { ...init, headers });
		});
		await closeDb();
		if (kills < KILLS) v.problems.push(`only ${kills} of ${KILLS} kills were made`);
		for (const problem of v.problems.slice(0, 20)) console.error(`  ${problem}`);
		const cut = servers.reduce((n, s) => n + s.cut, 0);
		say(`${cut} of the kills cut requests in flight; MariaDB restarts ${restarts}; feed 1..${v.feed.last}: ${v.feed.gaps} gaps, ${v.feed.duplicates} duplicates; ledger: ${v.phantom} unknown, ${v.refused} refused; ${phones.reduce((n, p) => n + p.syncs, 0)} sync rounds`);
		console.log(`kills ${kills}, ops ${v.ops}, stored ${v.stored}, lost ${v.lost}, duplicated ${v.duplicated}, converged ${v.converged}/${v.phones}`);
		return failed(v) ? 1 : 0;
	} finally {
		for (const s of servers) s.kill();
		servers = [];
		await maria.destroy();
	}
}

process.exit(
	await main().catch((e) => {
		console.error(e);
		return 2;
	})
);
