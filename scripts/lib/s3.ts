/**
 * The local fake photo store (scripts/fake-s3.js, s3rver) for `npm start` and the tests, run
 * like the fake mail server: a background process on 127.0.0.1, on 4569 or the next free
 * port, its pid and port recorded under .data/, its objects kept as files under .data/s3/.
 *
 * `name` keeps runs apart: `npm start` uses "fieldbench" (objects in .data/s3/); a test
 * runner uses its own name (.data/s3/<name>/, removed when it stops).
 */
import { spawn } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { freePort, ROOT } from './mariadb';

const DATA = path.join(ROOT, '.data');
const DEFAULT_PORT = Number(process.env.FAKE_S3_PORT ?? 4569);
/** The bucket the fake creates and the app is given. */
export const FAKE_BUCKET = 'fieldbench-photos';

const files = (name: string) => ({
	pid: path.join(DATA, `s3-${name}.pid`),
	port: path.join(DATA, `s3-${name}.port`),
	dir: name === 'fieldbench' ? path.join(DATA, 's3') : path.join(DATA, 's3', name)
});

function alive(pid: number): boolean {
	try {
		process.kill(pid, 0);
		return !/^\d+ \(.*\) Z/.test(readFileSync(`/proc/${pid}/stat`, 'utf8'));
	} catch {
		return false;
	}
}

const readNumber = (file: string) => (existsSync(file) ? Number(readFileSync(file, 'utf8').trim()) || null : null);

/** Whether an S3 server answers on the port (the bucket's listing, any HTTP answer). */
async function answers(port: number): Promise<boolean> {
	try {
		const r = await fetch(`http://127.0.0.1:${port}/`, { signal: AbortSignal.timeout(1000) });
		await r.arrayBuffer();
		return r.status < 500;
	} catch {
		return false;
	}
}

/** The running fake of `name`: its port, or null. */
export function runningS3Port(name = 'fieldbench'): number | null {
	const f = files(name);
	const pid = readNumber(f.pid);
	return pid && alive(pid) ? readNumber(f.port) : null;
}

/** Start (or reuse) the fake of `name`; resolves once it answers. */
export async function startS3Server(name = 'fieldbench', port?: number) {
	const f = files(name);
	mkdirSync(f.dir, { recursive: true });
	const running = runningS3Port(name);
	if (running && (await answers(running))) return { port: running, dir: f.dir, started: false };
	const p = port ?? (await freePort(DEFAULT_PORT));
	const child = spawn(
		process.execPath,
		[path.join(ROOT, 'scripts', 'fake-s3.js'), '--port', String(p), '--dir', f.dir, '--bucket', FAKE_BUCKET],
		{ cwd: ROOT, detached: true, stdio: 'ignore' }
	);
	child.unref();
	writeFileSync(f.pid, String(child.pid));
	writeFileSync(f.port, String(p));
	for (let i = 0; i < 100; i++) {
		if (await answers(p)) return { port: p, dir: f.dir, started: true };
		if (child.exitCode !== null) break;
		await new Promise((r) => setTimeout(r, 100));
	}
	throw new Error(`The fake photo store did not start on 127.0.0.1:${p}`);
}

/** Stop the fake of `name` and wait until it is gone; `clear` also deletes its objects. */
export async function stopS3Server(name = 'fieldbench', clear = false): Promise<boolean> {
	const f = files(name);
	const pid = readNumber(f.pid);
	let stopped = false;
	if (pid && alive(pid)) {
		process.kill(pid, 'SIGTERM');
		for (let i = 0; i < 100 && alive(pid); i++) await new Promise((r) => setTimeout(r, 50));
		if (alive(pid)) process.kill(pid, 'SIGKILL');
		stopped = true;
	}
	rmSync(f.pid, { force: true });
	if (clear) {
		rmSync(f.port, { force: true });
		if (name !== 'fieldbench') rmSync(f.dir, { recursive: true, force: true });
	}
	return stopped;
}

/** Environment for the app to keep photos in the fake. */
export function s3Env(port: number): Record<string, string> {
	return {
		S3_ENDPOINT: `http://127.0.0.1:${port}`,
		S3_BUCKET: FAKE_BUCKET,
		S3_REGION: 'us-east-1',
		S3_ACCESS_KEY_ID: 'S3RVER',
		S3_SECRET_ACCESS_KEY: 'S3RVER',
		S3_FORCE_PATH_STYLE: 'true'
	};
}
