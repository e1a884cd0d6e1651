import type { TestProject } from 'vitest/node';
import { migrate } from '../../scripts/lib/app';
import { freshDatabase, stopIfStarted } from '../helpers/database';

let started = false;

export async function setup(project: TestProject) {
	const db = await freshDatabase('fieldbench_test');
	started = db.started;
	Object.assign(process.env, db.env);
	await migrate();
	project.provide('dbEnv', db.env);
}

export async function teardown() {
	await stopIfStarted(started);
}

declare module 'vitest' {
	export interface ProvidedContext {
		dbEnv: Record<string, string>;
		baseURL: string;
	}
}
