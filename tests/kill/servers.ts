/**
 * Two app servers (`scripts/serve.js`, each in its own process group) on two ports sharing
 * one database, behind a pretend load balancer that sends each request to a server it
 * believes is up. `kill()` SIGKILLs a server's whole group, whatever it is doing.
 */
import type { ChildProcess } from 'node:child_process';
import { closeSync, openSync } from 'node:fs';
import path from 'node:path';
import { freePort, serve } from '../../scripts/lib/app';
import type { Rng } from './rng';

export class AppServer {
	child: ChildProcess | null = null;
	up = false;
	/** Requests sent to this server and not answered yet. */
	inflight = 0;
	/** Kills that landed while requests were in flight. */
	cut = 0;
	readonly url: string;

	constructor(
		readonly port: number,
		private env: Record<string, string>,
		private logDir: string
	) {
		this.url = `http://localhost:${port}`;
	}

	/** Start (again) and wait until it answers its health check. */
	async start(): Promise<void> {
		const log = openSync(path.join(this.logDir, `app-${this.port}.log`), 'a');
		try {
			const s = await serve(this.port, { ...this.env, WEB_CONCURRENCY: '1' }, ['ignore', log, log]);
			this.child = s.child;
			this.up = true;
		} finally {
			closeSync(log);
		}
	}

	/** SIGKILL the server's process group (the cluster primary and its app process). */
	kill(): void {
		this.up = false;
		if (this.inflight > 0) this.cut++;
		const pid = this.child?.pid;
		this.child?.unref();
		this.child = null;
		if (!pid) return;
		try {
			process.kill(-pid, 'SIGKILL');
		} catch {
			/* already gone */
		}
	}
}

export async function startServers(env: Record<string, string>, logDir: string, count = 2): Promise<AppServer[]> {
	const servers: AppServer[] = [];
	let from = 4600;
	for (let i = 0; i < count; i++) {
		const port = await freePort(from);
		from = port + 1;
		servers.push(new AppServer(port, env, logDir));
	}
	await Promise.all(servers.map((s) => s.start()));
	return servers;
}

/** The load balancer: a server believed up (any server when none is). */
export function balancer(servers: AppServer[], rng: Rng): () => AppServer {
	return () => {
		const up = servers.filter((s) => s.up);
		return rng.pick(up.length ? up : servers);
	};
}
