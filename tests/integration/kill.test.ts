/**
 * The kill test in its short form (`npm run test:kill` is the full one, at least 50 kills):
 * app servers SIGKILLed at random moments and MariaDB killed once while four simulated
 * phones sync; nothing may be lost, stored twice or left different. See tests/kill/run.ts.
 */
import { spawnSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';

describe('app servers killed mid-sync', () => {
	it('loses no op, stores none twice, and every phone ends with the server’s state', () => {
		const r = spawnSync('npx', ['tsx', 'tests/kill/run.ts'], {
			encoding: 'utf8',
			env: { ...process.env, KILL_KILLS: '8', KILL_DB_RESTARTS: '1', KILL_OPS_PER_PHONE: '400', KILL_GAP_MS: '1200' },
			timeout: 170_000
		});
		const summary = r.stdout.split('\n').find((l) => l.startsWith('kills ')) ?? '';
		if (r.status !== 0) console.error(r.stdout, r.stderr);
		expect(summary).toMatch(/^kills \d+, ops (\d+), stored \1, lost 0, duplicated 0, converged 4\/4$/);
		expect(Number(summary.match(/^kills (\d+)/)?.[1])).toBeGreaterThanOrEqual(8);
		expect(r.status).toBe(0);
	}, 180_000);
});
