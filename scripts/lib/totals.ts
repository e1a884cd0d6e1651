/**
 * The closing line of `npm test` and `.ci/run`: `N passed, N failed`, summed over every
 * runner from the JSON reports vitest writes to test-results/ (`<runner>.json`, with the
 * runner's exit code beside it in `<runner>.exit`).
 *
 * What counts as one failure besides a failed test:
 *  - a test file that failed to load, or whose setup or teardown threw (vitest marks the
 *    file `failed` with a message, and its tests are skipped or passed, not failed);
 *  - a runner that exited non-zero with nothing else failed (an error outside any test);
 *  - a runner whose report is missing or unreadable (it never ran, or died).
 */
import { existsSync, readFileSync } from 'node:fs';
import path from 'node:path';

/** The runners of `npm test`, in the order it runs them. */
export const RUNNERS = ['unit-integration', 'kill', 'e2e'] as const;

/** The parts of vitest's JSON report read here. */
export interface VitestReport {
	numPassedTests: number;
	numFailedTests: number;
	testResults: {
		name: string;
		status: string;
		message?: string;
		assertionResults: { status: string }[];
	}[];
}

export interface Count {
	passed: number;
	failed: number;
	/** One line per failure that is not a failed test. */
	problems: string[];
}

/** Count one runner's report; `exitCode` is the runner's, when known. */
export function countReport(report: VitestReport, exitCode: number | null = null): Count {
	const count: Count = {
		passed: report.numPassedTests,
		failed: report.numFailedTests,
		problems: []
	};
	for (const file of report.testResults) {
		if (file.status !== 'failed') continue;
		if (file.assertionResults.some((t) => t.status === 'failed')) continue; // counted above
		count.failed++;
		const why = (file.message || 'failed outside its tests').split('\n')[0];
		count.problems.push(`${path.relative(process.cwd(), file.name)}: ${why}`);
	}
	if (exitCode !== null && exitCode !== 0 && count.failed === 0) {
		count.failed++;
		count.problems.push(`the runner exited with code ${exitCode} (an error outside the tests)`);
	}
	return count;
}

/** Count every runner's report in `dir`; a missing or unreadable report is one failure. */
export function countRuns(dir: string, runners: readonly string[] = RUNNERS): Count {
	const total: Count = { passed: 0, failed: 0, problems: [] };
	for (const name of runners) {
		const file = path.join(dir, `${name}.json`);
		const exitFile = path.join(dir, `${name}.exit`);
		let count: Count;
		try {
			const report = JSON.parse(readFileSync(file, 'utf8')) as VitestReport;
			const exit = existsSync(exitFile) ? Number(readFileSync(exitFile, 'utf8').trim()) : null;
			count = countReport(report, Number.isInteger(exit) ? exit : null);
		} catch {
			count = { passed: 0, failed: 1, problems: ['no report (the runner did not run, or died)'] };
		}
		total.passed += count.passed;
		total.failed += count.failed;
		total.problems.push(...count.problems.map((p) => `${name}: ${p}`));
	}
	return total;
}

export function closingLine(count: Count): string {
	return `${count.passed} passed, ${count.failed} failed`;
}
