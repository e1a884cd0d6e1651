/**
 * `npm test`: unit and integration tests (vitest, real MariaDB), then a build and the
 * end-to-end tests in Debian's Chromium. Installs what a fresh Debian machine lacks, as
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

try {
	runVitest('unit-integration', ['unit', 'integration']);
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
