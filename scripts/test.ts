/**
 * `npm test`: unit and integration tests (vitest, real MariaDB), the kill test in its short
 * form (tests/kill/run.ts, on its own so its servers do not slow the unit tests down), then a
 * build and the end-to-end tests in Debian's Chromium. Installs what a fresh Debian machine lacks, as
 * `npm start` does: MariaDB (lib/mariadb.ts) and Chromium (lib/chromium.ts), with apt-get
 * when root, otherwise saying what to run. Starts the private MariaDB when it is not running
 * and stops it again only in that case. Each runner writes a JSON report and its exit code to
 * test-results/; the closing line `N passed, N failed` is counted from them (lib/totals.ts),
 * so a test file that fails to load counts as a failure.
 */
import { spawnSync } from 'node:child_process';
import { mkdirSync, rmSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { buildIfNeeded } from './lib/app';
import { ensureChromium } from './lib/chromium';
import { ROOT, startServer, stopServer } from './lib/mariadb';
import { closingLine, countRuns } from './lib/totals';

const OUT = path.join(ROOT, 'test-results');
rmSync(OUT, { recursive: true, force: true });
mkdirSync(OUT, { recursive: true });

const { started } = await startServer();
process.env.FIELDBENCH_KEEP_DB = '1'; // the runners reuse this server; we stop it below

/** Without a browser the end-to-end runner is not started (its missing report counts). */
let noBrowser: string | null = null;
try {
	process.env.CHROMIUM_PATH = ensureChromium();
} catch (e) {
	noBrowser = (e as Error).message;
	console.error(noBrowser);
}

function runVitest(name: string, projects: string[]): void {
	const file = path.join(OUT, `${name}.json`);
	const args = ['vitest', 'run', ...projects.flatMap((p) => ['--project', p])];
	args.push('--reporter=default', '--reporter=json', `--outputFile.json=${file}`);
	const r = spawnSync('npx', args, { cwd: ROOT, stdio: 'inherit', env: process.env });
	writeFileSync(path.join(OUT, `${name}.exit`), String(r.status ?? 1));
}

/**
 * The kill test, short: 8 app server kills and one MariaDB restart (`npm run test:kill`: 50
 * and 3). It counts as one test in the closing line (a report in vitest's shape).
 */
function runKill(): void {
	console.log('\nKill test, short form (npm run test:kill runs the full one)');
	const env = { ...process.env, KILL_KILLS: '8', KILL_DB_RESTARTS: '1', KILL_OPS_PER_PHONE: '300', KILL_GAP_MS: '1000' };
	const r = spawnSync('npx', ['tsx', 'tests/kill/run.ts'], { cwd: ROOT, stdio: 'inherit', env });
	const ok = r.status === 0;
	const report = {
		numPassedTests: ok ? 1 : 0,
		numFailedTests: ok ? 0 : 1,
		testResults: [{ name: 'tests/kill/run.ts', status: ok ? 'passed' : 'failed', assertionResults: [{ status: ok ? 'passed' : 'failed' }] }]
	};
	writeFileSync(path.join(OUT, 'kill.json'), JSON.stringify(report));
	writeFileSync(path.join(OUT, 'kill.exit'), String(r.status ?? 1));
}

try {
	runVitest('unit-integration', ['unit', 'integration']);
	try {
		buildIfNeeded();
		runKill();
	} catch (e) {
		console.error(e);
	}
	if (noBrowser) {
		console.error(`\nThe end-to-end tests did not run: ${noBrowser}`);
	} else {
		try {
			buildIfNeeded();
			runVitest('e2e', ['e2e']);
		} catch (e) {
			console.error(e);
		}
	}
} finally {
	if (started) await stopServer();
}
const count = countRuns(OUT);
if (count.problems.length) console.log('');
for (const p of count.problems) console.log(`Failed: ${p}`);
console.log(`\n${closingLine(count)}`);
process.exit(count.failed > 0 ? 1 : 0);
