import { afterAll, inject } from 'vitest';
import { closeDb, db } from '../../src/lib/server/db';

Object.assign(process.env, inject('dbEnv'));
db();
afterAll(async () => {
	await closeDb();
});
