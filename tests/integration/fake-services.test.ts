/**
 * The start and stop of the local fakes (scripts/lib/fake-service.ts, through the mail and
 * payment fakes' own modules): a started fake answers and is recorded; a second start reuses
 * it; a record whose process is gone is not reused; a stop ends the process and says whether
 * one ran.
 */
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import net from 'node:net';
import { afterAll, describe, expect, it } from 'vitest';
import { fakeFiles } from '../../scripts/lib/fake-service';
import { runningMailPort, startMailServer, stopMailServer } from '../../scripts/lib/mail';
import { freePort } from '../../scripts/lib/mariadb';
import { startPayServer, stopPayServer } from '../../scripts/lib/pay';

const NAME = `fakes-${process.pid}`;
const files = fakeFiles('mail', NAME);

/** The first line an SMTP server sends (RFC 5321 §4.2: a 220 greeting). */
function greeting(port: number): Promise<string> {
	return new Promise((resolve, reject) => {
		const s = net.connect(port, '127.0.0.1');
		s.once('data', (d) => {
			s.end();
			resolve(d.toString());
		});
		s.once('error', reject);
	});
}

function running(pid: number): boolean {
	try {
		process.kill(pid, 0);
		return true;
	} catch {
		return false;
	}
}

afterAll(async () => {
	await stopMailServer(NAME, true);
	await stopPayServer(NAME);
});

describe('a local fake', () => {
	it('starts on the port asked for, answers there and is recorded', async () => {
		const port = await freePort(4900);
		const mail = await startMailServer(NAME, port);
		expect(mail).toMatchObject({ port, started: true });
		expect(await greeting(port)).toMatch(/^220 /);
		const pid = Number(readFileSync(files.pid, 'utf8'));
		expect(running(pid)).toBe(true);
		expect(runningMailPort(NAME)).toBe(port);
	});

	it('is reused by a second start', async () => {
		const port = runningMailPort(NAME)!;
		const pid = readFileSync(files.pid, 'utf8');
		expect(await startMailServer(NAME)).toMatchObject({ port, started: false });
		expect(readFileSync(files.pid, 'utf8')).toBe(pid);
	});

	it('stops: its process ends, its pid file goes, and a second stop finds none', async () => {
		const pid = Number(readFileSync(files.pid, 'utf8'));
		expect(await stopMailServer(NAME)).toBe(true);
		expect(running(pid)).toBe(false);
		expect(existsSync(files.pid)).toBe(false);
		expect(runningMailPort(NAME)).toBeNull();
		expect(await stopMailServer(NAME)).toBe(false);
	});

	it('starts afresh when its record names a process that is gone', async () => {
		const port = await freePort(4900);
		writeFileSync(files.pid, '999999999');
		writeFileSync(files.port, String(port));
		const mail = await startMailServer(NAME, port);
		expect(mail.started).toBe(true);
		expect(Number(readFileSync(files.pid, 'utf8'))).not.toBe(999999999);
		expect(await greeting(port)).toMatch(/^220 /);
	});

	it('the payment fake answers its health check, is reused, and forgets its port when stopped', async () => {
		const pay = await startPayServer(NAME, 'http://127.0.0.1:9/api/pay/webhook');
		expect(pay.started).toBe(true);
		expect(await (await fetch(`${pay.url}/health`)).json()).toMatchObject({ fake: 'payments' });
		expect(await startPayServer(NAME, 'http://127.0.0.1:9/api/pay/webhook')).toEqual({ ...pay, started: false });
		expect(await stopPayServer(NAME)).toBe(true);
		expect(existsSync(fakeFiles('pay', NAME).port)).toBe(false);
	});
});
