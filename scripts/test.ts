/**
 * `npm test`: unit and integration tests (vitest, real MariaDB), the kill test in its short
 * form (tests/kill/run.ts, on its own so its servers do not slow the unit tests down), then a
 * build and the end-to-end tests in Debian's Chromium. Starts the private MariaDB when it is not running
 * and stops it again only in that case. Each runner writes a JSON report to test-results/;
 * the totals are printed as one line `N passed, N failed`.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync, rmSync } from 'node:fs';
import path from 'node:path';
import { buildIfNeeded } from './lib/app';
import { ROOT, startServer, stopServer } from './lib/mariadb';

const OUT = path.join(ROOT, 'test-results');
rmSync(OUT, { recursive: true, force: true });
mkdirSync(OUT, { recursive: true });

const { started } = await startServer();
process.env.FIELDBENCH_KEEP_DB = '1'; // the runners reuse this server; we stop it below

function runVitest(name: string, projects: string[]): { passed: number; failed: number } {
	const file = path.join(OUT, `${name}.json`);
	const args = ['vitest', 'run', ...projects.flatMap((p) => ['--project', p])];
	args.push('--reporter=default', '--reporter=json', `--outputFile.json=${file}`);
	const r = spawnSync('npx', args, { cwd: ROOT, stdio: 'inherit', env: process.env });
	if (!existsSync(file)) return { passed: 0, failed: 1 }; // the runner itself failed
	const report = JSON.parse(readFileSync(file, 'utf8'));
	const failed = report.numFailedTests + (r.status !== 0 && report.numFailedTests === 0 ? 1 : 0);
	return { passed: report.numPassedTests, failed };
}

/** The kill test, short: 8 app server kills and one MariaDB restart (`npm run test:kill`: 50 and 3). */
function runKill(): { passed: number; failed: number } {
	console.log('\nKill test, short form (npm run test:kill runs the full one)');
	const env = { ...process.env, KILL_KILLS: '8', KILL_DB_RESTARTS: '1', KILL_OPS_PER_PHONE: '300', KILL_GAP_MS: '1000' };
	const r = spawnSync('npx', ['tsx', 'tests/kill/run.ts'], { cwd: ROOT, stdio: 'inherit', env });
	return r.status === 0 ? { passed: 1, failed: 0 } : { passed: 0, failed: 1 };
}

const totals = { passed: 0, failed: 0 };
const add = (r: { passed: number; failed: number }) => {
	totals.passed += r.passed;
	totals.failed += r.failed;
};
try {
	add(runVitest('unit-integration', ['unit', 'integration']));
	try {
		buildIfNeeded();
		add(runKill());
		add(runVitest('e2e', ['e2e']));
	} catch (e) {
		console.error(e);
		totals.failed++;
	}
} finally {
	if (started) await stopServer();
}
console.log(`\n${totals.passed} passed, ${totals.failed} failed`);
process.exit(totals.failed > 0 ? 1 : 0);
