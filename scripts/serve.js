/**
 * Serve the built app (`build/index.js`, adapter-node) from several processes sharing one
 * port through `node:cluster`: WEB_CONCURRENCY processes, by default one per core (at most
 * 4). The app keeps nothing in memory between requests — sessions, sign-in throttles and the
 * per-device sync lock live in MariaDB — so any process may answer any request.
 *
 * The app processes get APP_NODE_FLAGS (default `DEFAULT_FLAGS` below). A process that ends
 * unexpectedly is replaced, a little later each time it happens again within a minute, and
 * the server stops with an error when they keep ending within seconds of starting (a broken
 * build). SIGINT/SIGTERM stop every process: adapter-node lets each finish its open requests,
 * and one still running after SHUTDOWN_TIMEOUT (adapter-node's, 30 s) plus 5 s is killed.
 */
import cluster from 'node:cluster';
import http from 'node:http';
import os from 'node:os';
import path from 'node:path';
import { pathToFileURL } from 'node:url';

/**
 * A fixed young generation of 32 MiB per semi-space, collected on the process's own thread.
 * A sync push keeps its parsed body alive for tens of milliseconds, so with V8's default
 * (growing from 1 MiB) it was copied and promoted at almost every scavenge, and the
 * background collector threads competed with the requests for the cores. With these flags
 * `npm run bench:sync` measured about 20 % more readings per second and a quarter less CPU
 * in the app (2 cores; README, "Benchmarks"). Costs about 64 MiB of memory per process.
 */
const DEFAULT_FLAGS = ['--max-semi-space-size=32', '--min-semi-space-size=32', '--single-threaded-gc'];

const wanted = Number(process.env.WEB_CONCURRENCY);
const count = Number.isInteger(wanted) && wanted > 0 ? wanted : Math.min(os.availableParallelism(), 4);
const flags =
	process.env.APP_NODE_FLAGS === undefined
		? DEFAULT_FLAGS
		: process.env.APP_NODE_FLAGS.split(/\s+/).filter(Boolean);
const app = pathToFileURL(path.resolve(import.meta.dirname, '..', 'build', 'index.js')).href;

/**
 * Headers for the answers adapter-node gives before the app's hooks run (the client build, the
 * font, the service worker, the prerendered shell; OWASP ASVS 5.0 §3.4). The app sets its own
 * on everything else (src/lib/server/security-headers.ts), replacing these. The shell's
 * script and style rules come in its own <meta> policy (SvelteKit's hashes); a header cannot
 * add to them, so this one names only what a <meta> policy cannot say.
 */
const STATIC_HEADERS = {
	'content-security-policy': "object-src 'none'; base-uri 'none'; frame-ancestors 'none'",
	'x-content-type-options': 'nosniff',
	'referrer-policy': 'same-origin',
	'x-frame-options': 'DENY'
};

if (cluster.isWorker) {
	// After adapter-node's graceful stop, let go of the primary: the IPC channel would keep
	// this process alive (the app's hook closes the database pool on the same event).
	process.once('sveltekit:shutdown', () => cluster.worker?.disconnect());
	// adapter-node creates its server with http.createServer(); every answer starts with the
	// static headers, before any handler writes its own.
	const createServer = http.createServer;
	http.createServer = (...args) => {
		const server = createServer(...args);
		server.on('request', (_req, res) => {
			for (const [name, value] of Object.entries(STATIC_HEADERS)) res.setHeader(name, value);
		});
		return server;
	};
	await import(app);
} else {
	cluster.setupPrimary({ execArgv: [...process.execArgv, ...flags] });
	let stopping = false;
	let quickExits = 0;
	const started = new Map();
	const fork = () => started.set(cluster.fork().id, Date.now());
	for (let i = 0; i < count; i++) fork();
	let lastExit = 0;
	let delay = 0;
	cluster.on('exit', (worker, code, signal) => {
		if (stopping) {
			if (!Object.keys(cluster.workers ?? {}).length) process.exit(0);
			return;
		}
		const now = Date.now();
		const quick = now - (started.get(worker.id) ?? 0) < 5000;
		quickExits = quick ? quickExits + 1 : 0;
		if (quickExits >= count * 2) {
			console.error('The app processes keep ending right after they start; stopping.');
			process.exit(1);
		}
		// Back off while they keep ending: 0.5 s, 1 s, 2 s … up to 30 s; reset after a calm minute.
		delay = now - lastExit > 60_000 ? 0 : Math.min(Math.max(delay * 2, 500), 30_000);
		lastExit = now;
		console.error(`App process ${worker.process.pid} ended (${signal ?? code}); starting another${delay ? ` in ${delay / 1000} s` : ''}.`);
		setTimeout(fork, delay);
	});
	for (const sig of ['SIGINT', 'SIGTERM']) {
		process.on(sig, () => {
			if (stopping) return;
			stopping = true;
			const workers = Object.values(cluster.workers ?? {});
			if (!workers.length) process.exit(0);
			for (const w of workers) w?.process.kill(sig);
			const grace = (Number(process.env.SHUTDOWN_TIMEOUT) || 30) * 1000 + 5000;
			setTimeout(() => {
				for (const w of Object.values(cluster.workers ?? {})) w?.process.kill('SIGKILL');
				process.exit(0);
			}, grace).unref();
		});
	}
}
