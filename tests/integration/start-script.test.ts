/**
 * `npm start` as a person runs it (scripts/start.ts), on a port other than the one asked for:
 * one address, printed once, last; sign-in works at both loopback names on that port; Ctrl+C
 * stops the app.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import net from 'node:net';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { freePort } from '../../scripts/lib/app';
import { dropDatabase, portFree, ROOT } from '../../scripts/lib/mariadb';
import { DEMO_PASSWORD, DEMO_USERS } from '../../src/lib/server/seed/demo';
import { Client } from '../helpers/http';

const DB = `fieldbench_start_${process.pid}`;
let blocker: net.Server;
let taken: number;
let child: ChildProcess;
let output = '';
let url = '';

beforeAll(async () => {
	taken = await freePort(4600);
	blocker = net.createServer();
	await new Promise<void>((r) => blocker.listen(taken, '127.0.0.1', r));
	child = spawn(path.join(ROOT, 'node_modules/.bin/tsx'), ['scripts/start.ts'], {
		cwd: ROOT,
		detached: true,
		env: { ...process.env, PORT: String(taken), DB_NAME: DB, WEB_CONCURRENCY: '1' }
	});
	child.stdout!.on('data', (d) => (output += d));
	child.stderr!.on('data', (d) => (output += d));
	const deadline = Date.now() + 150_000;
	while (!/Fieldbench is running at \S+/.test(output)) {
		if (child.exitCode !== null) throw new Error(`npm start ended early:\n${output}`);
		if (Date.now() > deadline) throw new Error(`npm start printed no address:\n${output}`);
		await new Promise((r) => setTimeout(r, 200));
	}
	url = output.match(/Fieldbench is running at (\S+)/)![1];
	await new Promise((r) => setTimeout(r, 1500)); // anything printed after the address shows now
}, 180_000);

afterAll(async () => {
	if (child?.pid && child.exitCode === null) {
		const ended = new Promise((r) => child.once('exit', r));
		process.kill(-child.pid, 'SIGTERM');
		await ended;
	}
	await new Promise((r) => blocker?.close(r));
	dropDatabase(DB);
}, 60_000);

describe('npm start', () => {
	it('takes the next free port when the one asked for is taken', () => {
		const port = Number(new URL(url).port);
		expect(port).toBeGreaterThan(taken);
		expect(output).toContain(`Port ${taken} is taken`);
	});

	it('prints one address, once, as its last line', () => {
		const lines = output.trim().split('\n');
		expect(lines.at(-1)).toBe(`Fieldbench is running at ${url}`);
		expect(output.match(/https?:\/\//g)).toEqual(['http://']);
		expect(output).not.toContain('Listening on');
	});

	for (const name of ['127.0.0.1', 'localhost']) {
		it(`lets the demo technician sign in at ${name}`, async () => {
			const base = `http://${name}:${new URL(url).port}`;
			const c = new Client(base);
			const tech = DEMO_USERS.find((u) => u.role === 'technician')!;
			const r = await c.signIn(tech.email, DEMO_PASSWORD);
			expect(r.status).toBe(303);
			expect((await (await c.get('/api/me')).json()).user.email).toBe(tech.email);
			const page = await c.get('/field', 'text/html');
			expect(page.status).toBe(200);
			expect((await c.get('/manifest.webmanifest')).status).toBe(200);
		});
	}

	it('still refuses a sign-in posted from another site', async () => {
		const c = new Client('http://evil.example');
		const r = await fetch(`${url}/sign-in`, {
			method: 'POST',
			headers: c.headers({ 'content-type': 'application/x-www-form-urlencoded' }),
			body: 'email=a%40b.example&password=x',
			redirect: 'manual'
		});
		expect(r.status).toBe(403);
	});

	it('stops the app on Ctrl+C (SIGINT), and its port comes free', async () => {
		const port = Number(new URL(url).port);
		const ended = new Promise((r) => child.once('exit', r));
		process.kill(-child.pid!, 'SIGINT');
		await ended;
		const deadline = Date.now() + 20_000;
		while (!(await portFree(port))) {
			expect(Date.now(), 'the app still holds its port').toBeLessThan(deadline);
			await new Promise((r) => setTimeout(r, 200));
		}
	}, 30_000);
});
