/** End-to-end: a fresh database, migrated and seeded, and the built app on a free port. */
import type { ChildProcess } from 'node:child_process';
import type { TestProject } from 'vitest/node';
import { buildIfNeeded, freePort, migrate, serve, stopServe } from '../../scripts/lib/app';
import { finish, freshDatabase } from '../helpers/database';

let child: ChildProcess | null = null;
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
	const s = await serve(await freePort(4300), db.env, 'ignore');
	child = s.child;
	project.provide('baseURL', s.url);
	project.provide('dbEnv', db.env);
}

export async function teardown() {
	if (child) stopServe(child);
	await finish(created);
}
