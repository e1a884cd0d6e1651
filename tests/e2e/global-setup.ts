/** End-to-end: a fresh database, migrated and seeded, and the built app on a free port. */
import type { ChildProcess } from 'node:child_process';
import type { TestProject } from 'vitest/node';
import { buildIfNeeded, freePort, migrate, serve, stopServe } from '../../scripts/lib/app';
import { finish, freshDatabase } from '../helpers/database';
import { startFakes, stopFakes } from '../helpers/fakes';

let child: ChildProcess | null = null;
/** This runner's own fakes (mail in .data/mail/<name>/, photos in .data/s3/<name>/, payments). */
const FAKES = `e2e-${process.pid}`;
let created: Awaited<ReturnType<typeof freshDatabase>> | null = null;

export async function setup(project: TestProject) {
	const db = await freshDatabase('fieldbench_e2e');
	created = db;
	Object.assign(process.env, db.env);
	await migrate();
	const { seedDemo } = await import('../../src/lib/server/seed/demo');
	const { closeDb } = await import('../../src/lib/server/db');
	await seedDemo();
	await closeDb();
	buildIfNeeded();
	const port = await freePort(4300);
	const fakes = await startFakes(FAKES, port);
	project.provide('mail', { name: FAKES, port: fakes.mail.port, dir: fakes.mail.dir });
	const s = await serve(port, { ...db.env, ...fakes.env }, 'ignore');
	child = s.child;
	project.provide('baseURL', s.url);
	project.provide('dbEnv', db.env);
}

export async function teardown() {
	if (child) stopServe(child);
	await stopFakes(FAKES);
	await finish(created);
}
