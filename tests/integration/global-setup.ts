/** Integration: a fresh, migrated test database and the built app serving it. */
import type { ChildProcess } from 'node:child_process';
import type { TestProject } from 'vitest/node';
import { buildIfNeeded, freePort, migrate, serve, stopServe } from '../../scripts/lib/app';
import { finish, freshDatabase } from '../helpers/database';
import { startFakes, stopFakes } from '../helpers/fakes';

let created: Awaited<ReturnType<typeof freshDatabase>> | null = null;
let child: ChildProcess | null = null;
/** This runner's own fakes (mail in .data/mail/<name>/, photos in .data/s3/<name>/, payments). */
const FAKES = `integration-${process.pid}`;

export async function setup(project: TestProject) {
	const db = await freshDatabase('fieldbench_test');
	created = db;
	Object.assign(process.env, db.env);
	await migrate();
	buildIfNeeded();
	const port = await freePort(4200);
	// Download addresses that expire soon, so the expiry test does not wait long.
	const fakes = await startFakes(FAKES, port, { PHOTO_URL_SECONDS: '2' });
	project.provide('mail', { name: FAKES, port: fakes.mail.port, dir: fakes.mail.dir });
	project.provide('s3Env', fakes.s3);
	project.provide('payURL', fakes.pay.url);
	const s = await serve(port, { ...db.env, ...fakes.env, ADDRESS_HEADER: 'x-forwarded-for' }, 'ignore');
	child = s.child;
	project.provide('dbEnv', db.env);
	project.provide('baseURL', s.url);
}

export async function teardown() {
	if (child) stopServe(child);
	await stopFakes(FAKES);
	await finish(created);
}

declare module 'vitest' {
	export interface ProvidedContext {
		dbEnv: Record<string, string>;
		baseURL: string;
		mail: { name: string; port: number; dir: string };
		payURL: string;
		s3Env: Record<string, string>;
	}
}
