/**
 * The local fake payment provider (scripts/fake-pay.js) for `npm start` and the tests, run
 * like the fake mail server: a background process on 127.0.0.1, on 12111 or the next free
 * port, its pid and port under .data/pay-<name>.pid|port. The app reaches it through the
 * provider's SDK pointed at `PAY_FAKE_URL`; the fake signs its webhooks with the same
 * `STRIPE_WEBHOOK_SECRET` the app checks them with, and sends them to `webhookUrl`.
 */
import { spawn } from 'node:child_process';
import { existsSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { freePort, ROOT } from './mariadb';

const DATA = path.join(ROOT, '.data');
const DEFAULT_PORT = Number(process.env.FAKE_PAY_PORT ?? 12111);
/** Test-mode keys of the local fake only (they open nothing anywhere else). */
export const FAKE_KEY = 'sk_test_fieldbench_local';
export const FAKE_WEBHOOK_SECRET = 'whsec_fieldbench_local';

const files = (name: string) => ({ pid: path.join(DATA, `pay-${name}.pid`), port: path.join(DATA, `pay-${name}.port`) });
const readNumber = (file: string) => (existsSync(file) ? Number(readFileSync(file, 'utf8').trim()) || null : null);

function alive(pid: number): boolean {
	try {
		process.kill(pid, 0);
		return !/^\d+ \(.*\) Z/.test(readFileSync(`/proc/${pid}/stat`, 'utf8'));
	} catch {
		return false;
	}
}

async function answers(port: number): Promise<boolean> {
	try {
		const r = await fetch(`http://127.0.0.1:${port}/health`, { signal: AbortSignal.timeout(1000) });
		return r.ok && (await r.json()).fake === 'payments';
	} catch {
		return false;
	}
}

/** Start (or reuse) the fake of `name`, sending its webhooks to `webhookUrl`. */
export async function startPayServer(name: string, webhookUrl: string) {
	const f = files(name);
	const running = readNumber(f.pid);
	const runningPort = readNumber(f.port);
	if (running && alive(running) && runningPort && (await answers(runningPort))) {
		await fetch(`http://127.0.0.1:${runningPort}/_fake/webhook-url`, { method: 'POST', body: JSON.stringify({ url: webhookUrl }) });
		return { port: runningPort, url: `http://127.0.0.1:${runningPort}`, started: false };
	}
	const p = await freePort(DEFAULT_PORT);
	const child = spawn(
		process.execPath,
		[path.join(ROOT, 'scripts', 'fake-pay.js'), '--port', String(p), '--key', FAKE_KEY, '--webhook-secret', FAKE_WEBHOOK_SECRET, '--webhook-url', webhookUrl],
		{ cwd: ROOT, detached: true, stdio: 'ignore' }
	);
	child.unref();
	writeFileSync(f.pid, String(child.pid));
	writeFileSync(f.port, String(p));
	for (let i = 0; i < 100; i++) {
		if (await answers(p)) return { port: p, url: `http://127.0.0.1:${p}`, started: true };
		if (child.exitCode !== null) break;
		await new Promise((r) => setTimeout(r, 100));
	}
	throw new Error(`The fake payment provider did not start on 127.0.0.1:${p}`);
}

/** Stop the fake of `name` and wait until it is gone. */
export async function stopPayServer(name: string): Promise<boolean> {
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
	rmSync(f.port, { force: true });
	return stopped;
}

/** Environment for the app to take payments through the fake. */
export function payEnv(url: string): Record<string, string> {
	return { STRIPE_SECRET_KEY: FAKE_KEY, STRIPE_WEBHOOK_SECRET: FAKE_WEBHOOK_SECRET, PAY_FAKE_URL: url };
}
