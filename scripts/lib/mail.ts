/**
 * The local fake mail server (scripts/fake-smtp.js) for `npm start` and the tests, run like
 * the private MariaDB: a background process on 127.0.0.1, on 2525 or the next free port,
 * its pid and port recorded under .data/, its messages saved as .eml files under .data/mail/.
 *
 * `name` keeps runs apart: `npm start` uses "fieldbench" (messages in .data/mail/); a test
 * runner uses its own name (messages in .data/mail/<name>/), so they never mix.
 */
import { spawn } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import net from 'node:net';
import path from 'node:path';
import { freePort, ROOT } from './mariadb';

const DATA = path.join(ROOT, '.data');
const DEFAULT_PORT = Number(process.env.FAKE_SMTP_PORT ?? 2525);

const files = (name: string) => ({
	pid: path.join(DATA, `mail-${name}.pid`),
	port: path.join(DATA, `mail-${name}.port`),
	dir: name === 'fieldbench' ? path.join(DATA, 'mail') : path.join(DATA, 'mail', name)
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

function answers(port: number): Promise<boolean> {
	return new Promise((resolve) => {
		const s = net.connect(port, '127.0.0.1');
		s.once('data', (d) => {
			s.end();
			resolve(d.toString().startsWith('220'));
		});
		s.once('error', () => resolve(false));
		s.setTimeout(1000, () => {
			s.destroy();
			resolve(false);
		});
	});
}

/** The running fake of `name`: its port, or null. */
export function runningMailPort(name = 'fieldbench'): number | null {
	const f = files(name);
	const pid = readNumber(f.pid);
	return pid && alive(pid) ? readNumber(f.port) : null;
}

/**
 * Start (or reuse) the fake of `name`, on `port` when given (it must be free), else on 2525
 * or the next free port. Resolves once it greets.
 */
export async function startMailServer(name = 'fieldbench', port?: number) {
	const f = files(name);
	mkdirSync(f.dir, { recursive: true });
	const running = runningMailPort(name);
	if (running && (await answers(running))) return { port: running, dir: f.dir, started: false };
	const p = port ?? (await freePort(DEFAULT_PORT));
	const child = spawn(process.execPath, [path.join(ROOT, 'scripts', 'fake-smtp.js'), '--port', String(p), '--dir', f.dir], {
		cwd: ROOT,
		detached: true,
		stdio: 'ignore'
	});
	child.unref();
	writeFileSync(f.pid, String(child.pid));
	writeFileSync(f.port, String(p));
	for (let i = 0; i < 100; i++) {
		if (await answers(p)) return { port: p, dir: f.dir, started: true };
		if (child.exitCode !== null) break;
		await new Promise((r) => setTimeout(r, 100));
	}
	throw new Error(`The fake mail server did not start on 127.0.0.1:${p}`);
}

/** Stop the fake of `name` and wait until it is gone; `clear` also deletes its messages. */
export async function stopMailServer(name = 'fieldbench', clear = false): Promise<boolean> {
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

/** Environment for the app to send through the fake. */
export function mailEnv(port: number, dir: string): Record<string, string> {
	return {
		SMTP_HOST: '127.0.0.1',
		SMTP_PORT: String(port),
		SMTP_IGNORE_TLS: 'true',
		SMTP_FROM: 'Fieldbench demo <reports@fieldbench.localhost>',
		SMTP_FAKE_DIR: dir
	};
}
