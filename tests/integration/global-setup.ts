/** Integration: a fresh, migrated test database and the built app serving it. */
import type { ChildProcess } from 'node:child_process';
import type { TestProject } from 'vitest/node';
import { buildIfNeeded, freePort, migrate, serve, stopServe } from '../../scripts/lib/app';
import { finish, freshDatabase } from '../helpers/database';

let created: Awaited<ReturnType<typeof freshDatabase>> | null = null;
let child: ChildProcess | null = null;

export async function setup(project: TestProject) {
	const db = await freshDatabase('fieldbench_test');
	created = db;
	Object.assign(process.env, db.env);
	await migrate();
	buildIfNeeded();
	const s = await serve(
		await freePort(4200),
		{ ...db.env, ADDRESS_HEADER: 'x-forwarded-for' },
		'ignore'
	);
	child = s.child;
	project.provide('dbEnv', db.env);
	project.provide('baseURL', s.url);
}

export async function teardown() {
	if (child) stopServe(child);
	await finish(created);
}

declare module 'vitest' {
	export interface ProvidedContext {
		dbEnv: Record<string, string>;
		baseURL: string;
	}
}
