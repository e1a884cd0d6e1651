/**
 * `npm run docs:screenshots [URL]`: the two phone screens shown in the README, taken with
 * playwright-core and Debian's Chromium at 390×844 from a running app (`npm start`; the
 * URL defaults to http://localhost:3000), signed in as the demo technician:
 * docs/phone-my-jobs.png (/field) and docs/phone-job.png (the demo's Job 1001).
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { chromium } from 'playwright-core';
import { DEMO_PASSWORD, DEMO_USERS } from '../src/lib/server/seed/demo';
import { CHROMIUM_ARGS, chromiumPath } from './lib/chromium';
import { ROOT } from './lib/mariadb';

const base = (process.argv[2] ?? 'http://localhost:3000').replace(/\/$/, '');
const DOCS = path.join(ROOT, 'docs');
const tech = DEMO_USERS.find((u) => u.role === 'technician')!;

const profile = mkdtempSync(path.join(tmpdir(), 'fieldbench-docs-'));
const context = await chromium.launchPersistentContext(profile, {
	executablePath: chromiumPath(),
	headless: true,
	viewport: { width: 390, height: 844 },
	deviceScaleFactor: 2,
	isMobile: true,
	hasTouch: true,
	args: CHROMIUM_ARGS
});
try {
	const page = context.pages()[0] ?? (await context.newPage());
	await page.goto(`${base}/sign-in`);
	await page.getByLabel('E-mail').fill(tech.email);
	await page.getByLabel('Password').fill(DEMO_PASSWORD);
	await page.getByRole('button', { name: 'Sign in' }).click();
	await page.waitForURL(`${base}/field`);
	await page.getByTestId('job-list').getByText('Job 1001').waitFor();
	await page.getByText('All sent').first().waitFor({ timeout: 15_000 }).catch(() => {});
	await page.screenshot({ path: path.join(DOCS, 'phone-my-jobs.png') });
	await page.getByTestId('job-list').getByText('Job 1001').click();
	await page.waitForURL(/\/field\/job\//);
	await page.waitForLoadState('networkidle');
	await page.screenshot({ path: path.join(DOCS, 'phone-job.png') });
	console.log(`Saved docs/phone-my-jobs.png and docs/phone-job.png from ${base}`);
} finally {
	await context.close();
	rmSync(profile, { recursive: true, force: true });
}
