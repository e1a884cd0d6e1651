import { spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
	closingLine,
	countReport,
	countRuns,
	type VitestReport
} from '../../../scripts/lib/totals';

// The reports are vitest's own: a small run over files made to fail in each way.
const FILES: Record<string, string> = {
	'passes.test.ts': `import { it, expect } from 'vitest';
it('adds', () => expect(1 + 1).toBe(2));
it('subtracts', () => expect(2 - 1).toBe(1));`,
	'one-fails.test.ts': `import { it, expect } from 'vitest';
it('passes', () => expect(1).toBe(1));
it('fails', () => expect(1).toBe(2));`,
	'does-not-load.test.ts': `import { missing } from './no-such-module';
import { it, expect } from 'vitest';
it('never runs', () => expect(missing).toBe(1));`,
	'setup-throws.test.ts': `import { beforeAll, it, expect } from 'vitest';
beforeAll(() => { throw new Error('the database did not answer'); });
it('is skipped', () => expect(1).toBe(1));
it('is skipped too', () => expect(1).toBe(1));`,
	'teardown-throws.test.ts': `import { afterAll, it, expect } from 'vitest';
afterAll(() => { throw new Error('could not close'); });
it('passes before the teardown', () => expect(1).toBe(1));`
};

let dir: string;
let out: string;
let exitCode: number | null;

function runFixtures(names: string[], report: string): number | null {
	const root = path.join(dir, path.basename(report, '.json'));
	mkdirSync(root, { recursive: true });
	for (const n of names) writeFileSync(path.join(root, n), FILES[n]);
	writeFileSync(path.join(root, 'vitest.config.mjs'), 'export default {};\n');
	const env = Object.fromEntries(
		Object.entries(process.env).filter(([k]) => !k.startsWith('VITEST') && k !== 'NODE_OPTIONS')
	);
	const r = spawnSync(
		path.resolve('node_modules/.bin/vitest'),
		[
			'run',
			'--root',
			root,
			'--config',
			path.join(root, 'vitest.config.mjs'),
			'--reporter=json',
			`--outputFile.json=${report}`
		],
		{ env, encoding: 'utf8', timeout: 60_000 }
	);
	return r.status;
}

beforeAll(() => {
	dir = mkdtempSync(path.join(tmpdir(), 'fieldbench-totals-'));
	out = path.join(dir, 'test-results');
	mkdirSync(out);
	exitCode = runFixtures(Object.keys(FILES), path.join(out, 'unit-integration.json'));
	writeFileSync(path.join(out, 'unit-integration.exit'), String(exitCode));
}, 90_000);
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const report = (): VitestReport =>
	JSON.parse(readFileSync(path.join(out, 'unit-integration.json'), 'utf8'));

describe('the closing line of the test run', () => {
	it('reads a report in which vitest itself counts only one failed test', () => {
		expect(exitCode).toBe(1);
		const r = report();
		// What the line used to add up: 4 passed, 1 failed, although four files failed.
		expect([r.numPassedTests, r.numFailedTests]).toEqual([4, 1]);
	});

	it('counts a file that fails to load, and one whose setup or teardown throws', () => {
		const count = countReport(report(), exitCode);
		expect(count).toMatchObject({ passed: 4, failed: 4 });
		expect(count.problems.join('\n')).toContain('does-not-load.test.ts');
		expect(count.problems.join('\n')).toContain('the database did not answer');
		expect(count.problems.join('\n')).toContain('could not close');
		expect(count.problems.join('\n')).not.toContain('one-fails.test.ts');
	});

	it('counts a runner that exited with an error although every test passed', () => {
		const clean: VitestReport = { ...report(), numFailedTests: 0, testResults: [] };
		expect(countReport(clean, 0).failed).toBe(0);
		expect(countReport(clean, 1).failed).toBe(1);
		expect(countReport(clean, null).failed).toBe(0);
	});

	it('adds up every runner and counts one that left no report as failed', () => {
		const count = countRuns(out, ['unit-integration', 'e2e']);
		expect(closingLine(count)).toBe('4 passed, 5 failed');
		expect(count.problems.at(-1)).toBe('e2e: no report (the runner did not run, or died)');
	});

	it('ends the run with a clean line when everything passed', () => {
		// The same report cut down to the file that passed, as vitest reports a clean run.
		const r = report();
		const passing = r.testResults.filter((f) => f.name.endsWith('passes.test.ts'));
		expect(passing).toHaveLength(1);
		const clean = path.join(dir, 'clean');
		mkdirSync(clean);
		const cleanReport = { ...r, numPassedTests: 2, numFailedTests: 0, testResults: passing };
		writeFileSync(path.join(clean, 'e2e.json'), JSON.stringify(cleanReport));
		writeFileSync(path.join(clean, 'e2e.exit'), '0');
		expect(closingLine(countRuns(clean, ['e2e']))).toBe('2 passed, 0 failed');
	});
});
