/**
 * The local fake photo store (scripts/fake-s3.js, s3rver) for `npm start` and the tests, run
 * like the fake mail server (lib/fake-service.ts): a background process on 127.0.0.1, on
 * 4569 or the next free port, its pid and port recorded under .data/, its objects kept as
 * files under .data/s3/.
 *
 * `name` keeps runs apart: `npm start` uses "fieldbench" (objects in .data/s3/); a test
 * runner uses its own name (.data/s3/<name>/, removed when it stops).
 */
import { mkdirSync, rmSync } from 'node:fs';
import path from 'node:path';
import { fakeFiles, runningFakePort, startFake, stopFake } from './fake-service';
import { ROOT } from './mariadb';

const DATA = path.join(ROOT, '.data');
const DEFAULT_PORT = Number(process.env.FAKE_S3_PORT ?? 4569);
/** The bucket the fake creates and the app is given. */
export const FAKE_BUCKET = 'fieldbench-photos';

const dirOf = (name: string) => (name === 'fieldbench' ? path.join(DATA, 's3') : path.join(DATA, 's3', name));

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
	return runningFakePort(fakeFiles('s3', name));
}

/** Start (or reuse) the fake of `name`; resolves once it answers. */
export async function startS3Server(name = 'fieldbench', port?: number) {
	const dir = dirOf(name);
	mkdirSync(dir, { recursive: true });
	const service = {
		label: 'The fake photo store',
		script: 'fake-s3.js',
		args: ['--dir', dir, '--bucket', FAKE_BUCKET],
		defaultPort: DEFAULT_PORT,
		answers
	};
	const { port: p, started } = await startFake(fakeFiles('s3', name), service, port);
	return { port: p, dir, started };
}

/** Stop the fake of `name` and wait until it is gone; `clear` also deletes its objects. */
export async function stopS3Server(name = 'fieldbench', clear = false): Promise<boolean> {
	const stopped = await stopFake(fakeFiles('s3', name), clear);
	if (clear && name !== 'fieldbench') rmSync(dirOf(name), { recursive: true, force: true });
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
