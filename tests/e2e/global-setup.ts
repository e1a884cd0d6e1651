/** End-to-end: a fresh database, migrated and seeded, and the built app on a free port. */
import type { ChildProcess } from 'node:child_process';
import type { TestProject } from 'vitest/node';
import { buildIfNeeded, freePort, migrate, serve, stopServe } from '../../scripts/lib/app';
import { mailEnv, startMailServer, stopMailServer } from '../../scripts/lib/mail';
import { s3Env, startS3Server, stopS3Server } from '../../scripts/lib/s3';
import { finish, freshDatabase } from '../helpers/database';

let child: ChildProcess | null = null;
/** This runner's own fake mail server (its messages in .data/mail/<name>/). */
const MAIL_NAME = `e2e-${process.pid}`;
/** This runner's own fake photo store (its objects in .data/s3/<name>/). */
const S3_NAME = `e2e-${process.pid}`;
/** E-mail looked at often and retried soon, so the tests do not wait long. */
const FAST_MAIL = { MAIL_POLL_MS: '500', MAIL_RETRY_BASE_MS: '300', MAIL_MAX_ATTEMPTS: '8' };
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
	const mail = await startMailServer(MAIL_NAME);
	project.provide('mail', { name: MAIL_NAME, port: mail.port, dir: mail.dir });
	const store = await startS3Server(S3_NAME);
	const s = await serve(await freePort(4300), { ...db.env, ...mailEnv(mail.port, mail.dir), ...FAST_MAIL, ...s3Env(store.port) }, 'ignore');
	child = s.child;
	project.provide('baseURL', s.url);
	project.provide('dbEnv', db.env);
}

export async function teardown() {
	if (child) stopServe(child);
	await stopMailServer(MAIL_NAME, true);
	await stopS3Server(S3_NAME, true);
	await finish(created);
}
