import { afterAll, inject } from 'vitest';
import { closeDb, db } from '../../src/lib/server/db';

Object.assign(process.env, inject('dbEnv'), inject('s3Env'));
db();
afterAll(async () => {
	await closeDb();
});
