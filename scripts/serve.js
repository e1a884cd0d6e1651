/**
 * Serve the built app (`build/index.js`, adapter-node) from several processes sharing one
 * port through `node:cluster`: WEB_CONCURRENCY processes, by default one per core (at most
 * 4). The app keeps nothing in memory between requests — sessions, sign-in throttles and the
 * per-device sync lock live in MariaDB — so any process may answer any request.
 *
 * A process that ends unexpectedly is replaced, unless they keep ending within seconds of
 * starting (a broken build or an unreachable database): then the server stops with an error.
 * SIGINT/SIGTERM stop every process (adapter-node lets each finish its open requests).
 */
import cluster from 'node:cluster';
import os from 'node:os';
import path from 'node:path';
import { pathToFileURL } from 'node:url';

const wanted = Number(process.env.WEB_CONCURRENCY);
const count = Number.isInteger(wanted) && wanted > 0 ? wanted : Math.min(os.availableParallelism(), 4);
const app = pathToFileURL(path.resolve(import.meta.dirname, '..', 'build', 'index.js')).href;

if (count === 1 || !cluster.isPrimary) {
	// After adapter-node's graceful stop, let go of the primary: the IPC channel would keep
	// this process alive (the app's hook closes the database pool on the same event).
	if (cluster.isWorker) process.once('sveltekit:shutdown', () => cluster.worker?.disconnect());
	await import(app);
} else {
	let stopping = false;
	let quickExits = 0;
	const started = new Map();
	const fork = () => started.set(cluster.fork().id, Date.now());
	for (let i = 0; i < count; i++) fork();
	cluster.on('exit', (worker, code, signal) => {
		if (stopping) {
			if (!Object.keys(cluster.workers ?? {}).length) process.exit(0);
			return;
		}
		const quick = Date.now() - (started.get(worker.id) ?? 0) < 5000;
		quickExits = quick ? quickExits + 1 : 0;
		if (quickExits >= count * 2) {
			console.error('The app processes keep ending right after they start; stopping.');
			process.exit(1);
		}
		console.error(`App process ${worker.process.pid} ended (${signal ?? code}); starting another.`);
		fork();
	});
	for (const sig of ['SIGINT', 'SIGTERM']) {
		process.on(sig, () => {
			stopping = true;
			const workers = Object.values(cluster.workers ?? {});
			if (!workers.length) process.exit(0);
			for (const w of workers) w?.process.kill(sig);
		});
	}
}
