/** Integration: a fresh, migrated test database and the built app serving it. */
import type { ChildProcess } from 'node:child_process';
import type { TestProject } from 'vitest/node';
import { buildIfNeeded, freePort, migrate, serve, stopServe } from '../../scripts/lib/app';
import { mailEnv, startMailServer, stopMailServer } from '../../scripts/lib/mail';
import { s3Env, startS3Server, stopS3Server } from '../../scripts/lib/s3';
import { finish, freshDatabase } from '../helpers/database';

let created: Awaited<ReturnType<typeof freshDatabase>> | null = null;
let child: ChildProcess | null = null;
/** This runner's own fake mail server (its messages in .data/mail/<name>/). */
const MAIL_NAME = `integration-${process.pid}`;
/** This runner's own fake photo store (its objects in .data/s3/<name>/). */
const S3_NAME = `integration-${process.pid}`;
/** E-mail looked at often and retried soon, so the tests do not wait long. */
const FAST_MAIL = { MAIL_POLL_MS: '500', MAIL_RETRY_BASE_MS: '300', MAIL_MAX_ATTEMPTS: '8' };

export async function setup(project: TestProject) {
	const db = await freshDatabase('fieldbench_test');
	created = db;
	Object.assign(process.env, db.env);
	await migrate();
	buildIfNeeded();
	const mail = await startMailServer(MAIL_NAME);
	project.provide('mail', { name: MAIL_NAME, port: mail.port, dir: mail.dir });
	const store = await startS3Server(S3_NAME);
	// Download addresses that expire soon, so the expiry test does not wait long.
	const photos = { ...s3Env(store.port), PHOTO_URL_SECONDS: '2' };
	project.provide('s3Env', photos);
	const s = await serve(
		await freePort(4200),
		{ ...db.env, ...mailEnv(mail.port, mail.dir), ...FAST_MAIL, ...photos, ADDRESS_HEADER: 'x-forwarded-for' },
		'ignore'
	);
	child = s.child;
	project.provide('dbEnv', db.env);
	project.provide('baseURL', s.url);
}

export async function teardown() {
	if (child) stopServe(child);
	await stopMailServer(MAIL_NAME, true);
	await stopS3Server(S3_NAME, true);
	await finish(created);
}

declare module 'vitest' {
	export interface ProvidedContext {
		dbEnv: Record<string, string>;
		baseURL: string;
		mail: { name: string; port: number; dir: string };
		s3Env: Record<string, string>;
	}
}
