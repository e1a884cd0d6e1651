/**
 * The local fake mail server (scripts/fake-smtp.js) for `npm start` and the tests, run like
 * the private MariaDB (lib/fake-service.ts): a background process on 127.0.0.1, on 2525 or
 * the next free port, its pid and port recorded under .data/, its messages saved as .eml
 * files under .data/mail/.
 *
 * `name` keeps runs apart: `npm start` uses "fieldbench" (messages in .data/mail/); a test
 * runner uses its own name (messages in .data/mail/<name>/), so they never mix.
 */
import { mkdirSync, rmSync } from 'node:fs';
import net from 'node:net';
import path from 'node:path';
import { fakeFiles, runningFakePort, startFake, stopFake } from './fake-service';
import { ROOT } from './mariadb';

const DATA = path.join(ROOT, '.data');
const DEFAULT_PORT = Number(process.env.FAKE_SMTP_PORT ?? 2525);

const dirOf = (name: string) => (name === 'fieldbench' ? path.join(DATA, 'mail') : path.join(DATA, 'mail', name));

/** Whether an SMTP server greets on the port. */
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
	return runningFakePort(fakeFiles('mail', name));
}

/**
 * Start (or reuse) the fake of `name`, on `port` when given (it must be free), else on 2525
 * or the next free port. Resolves once it greets.
 */
export async function startMailServer(name = 'fieldbench', port?: number) {
	const dir = dirOf(name);
	mkdirSync(dir, { recursive: true });
	const service = { label: 'The fake mail server', script: 'fake-smtp.js', args: ['--dir', dir], defaultPort: DEFAULT_PORT, answers };
	const { port: p, started } = await startFake(fakeFiles('mail', name), service, port);
	return { port: p, dir, started };
}

/** Stop the fake of `name` and wait until it is gone; `clear` also deletes its messages. */
export async function stopMailServer(name = 'fieldbench', clear = false): Promise<boolean> {
	const stopped = await stopFake(fakeFiles('mail', name), clear);
	if (clear && name !== 'fieldbench') rmSync(dirOf(name), { recursive: true, force: true });
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
