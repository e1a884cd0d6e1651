/**
 * What the local fakes share (mail.ts, s3.ts, pay.ts): each runs like the private MariaDB, as
 * a detached background process on 127.0.0.1, its pid and port recorded in
 * .data/<kind>-<name>.pid|port. A running one that answers is reused; a new one is spawned
 * on the port asked for or the first free one from its default, and waited for until it
 * answers; stopping sends SIGTERM, waits up to 5 s, then SIGKILL.
 *
 * Each fake keeps its own module: its script, arguments, how to tell that it answers, where
 * its files go and the environment the app is given.
 */
import { spawn } from 'node:child_process';
import { existsSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { freePort, ROOT } from './mariadb';
import { alive, readPid } from './pid';

const DATA = path.join(ROOT, '.data');

/** Where one fake's pid and port are recorded. */
export type FakeFiles = { pid: string; port: string };

/** The pid and port files of fake `kind` ("mail", "s3", "pay") run under `name`. */
export const fakeFiles = (kind: string, name: string): FakeFiles => ({
	pid: path.join(DATA, `${kind}-${name}.pid`),
	port: path.join(DATA, `${kind}-${name}.port`)
});

/** The port in `file`, or null when there is none. */
const readPort = (file: string) => (existsSync(file) ? Number(readFileSync(file, 'utf8').trim()) || null : null);

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** The port of the running fake recorded in `files`, or null. */
export function runningFakePort(files: FakeFiles): number | null {
	return alive(readPid(files.pid)) ? readPort(files.port) : null;
}

export type FakeService = {
	/** Begins the error when it does not start: "The fake mail server". */
	label: string;
	/** Its script under scripts/. */
	script: string;
	/** Its arguments after `--port N`. */
	args: string[];
	/** The first port tried when none is asked for. */
	defaultPort: number;
	/** Whether the fake answers on `port`. */
	answers(port: number): Promise<boolean>;
};

/**
 * Start (or reuse) the fake recorded in `files`: on `port` when given (it must be free), else
 * on its default port or the next free one. Resolves once it answers; `started` says whether
 * this call started it.
 */
export async function startFake(
	files: FakeFiles,
	service: FakeService,
	port?: number
): Promise<{ port: number; started: boolean }> {
	const running = runningFakePort(files);
	if (running && (await service.answers(running))) return { port: running, started: false };
	const p = port ?? (await freePort(service.defaultPort));
	const child = spawn(process.execPath, [path.join(ROOT, 'scripts', service.script), '--port', String(p), ...service.args], {
		cwd: ROOT,
		detached: true,
		stdio: 'ignore'
	});
	child.unref();
	writeFileSync(files.pid, String(child.pid));
	writeFileSync(files.port, String(p));
	for (let i = 0; i < 100; i++) {
		if (await service.answers(p)) return { port: p, started: true };
		if (child.exitCode !== null) break;
		await sleep(100);
	}
	throw new Error(`${service.label} did not start on 127.0.0.1:${p}`);
}

/**
 * Stop the fake recorded in `files` and wait until it is gone; its pid file is removed, its
 * port file too when `forgetPort`. Resolves to whether it was running.
 */
export async function stopFake(files: FakeFiles, forgetPort: boolean): Promise<boolean> {
	const pid = readPid(files.pid);
	let stopped = false;
	if (pid && alive(pid)) {
		process.kill(pid, 'SIGTERM');
		for (let i = 0; i < 100 && alive(pid); i++) await sleep(50);
		if (alive(pid)) process.kill(pid, 'SIGKILL');
		stopped = true;
	}
	rmSync(files.pid, { force: true });
	if (forgetPort) rmSync(files.port, { force: true });
	return stopped;
}
