/** Debian's Chromium through playwright-core (never a browser download). */
import { mkdirSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { createRequire } from 'node:module';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { chromium, type BrowserContext, type Page } from 'playwright-core';

export const PHONE = { width: 390, height: 844 };
export const SHOTS = path.resolve('screenshots');

export async function openPhone(): Promise<{
	context: BrowserContext;
	page: Page;
	errors: string[];
	close: () => Promise<void>;
}> {
	const profile = mkdtempSync(path.join(tmpdir(), 'fieldbench-e2e-'));
	const context = await chromium.launchPersistentContext(profile, {
		executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
		headless: true,
		viewport: PHONE,
		deviceScaleFactor: 2,
		isMobile: true,
		hasTouch: true,
		args: [
			'--no-sandbox',
			'--disable-gpu',
			'--disable-quic',
			'--no-first-run',
			'--disable-background-networking',
			'--disable-component-update',
			'--disable-sync'
		]
	});
	const page = context.pages()[0] ?? (await context.newPage());
	const errors: string[] = []; // uncaught errors in the page (a failed hydration shows here)
	page.on('pageerror', (e) => errors.push(e.message));
	return {
		context,
		page,
		errors,
		close: async () => {
			await context.close();
			rmSync(profile, { recursive: true, force: true });
		}
	};
}

export async function shot(page: Page, name: string) {
	mkdirSync(SHOTS, { recursive: true });
	await page.screenshot({ path: path.join(SHOTS, `${name}.png`) });
}

/** Sign in through the form as a demo user (cookies cleared first) and land on /field. */
export async function signInAs(phone: { page: Page; context: BrowserContext }, base: string, email: string) {
	const { DEMO_PASSWORD } = await import('../../src/lib/server/seed/demo');
	await phone.context.clearCookies();
	await phone.page.goto(`${base}/sign-in`);
	await phone.page.getByLabel('E-mail').fill(email);
	await phone.page.getByLabel('Password').fill(DEMO_PASSWORD);
	await phone.page.getByRole('button', { name: 'Sign in' }).click();
	await phone.page.waitForURL(`${base}/field`);
}

/** A desk-size browser (a lead at the office), with the same flags as `openPhone`. */
export async function openDesk(viewport = { width: 1280, height: 900 }) {
	const profile = mkdtempSync(path.join(tmpdir(), 'fieldbench-e2e-desk-'));
	const context = await chromium.launchPersistentContext(profile, {
		executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
		headless: true,
		viewport,
		args: ['--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync']
	});
	const page = context.pages()[0] ?? (await context.newPage());
	const errors: string[] = [];
	page.on('pageerror', (e) => errors.push(e.message));
	return {
		context,
		page,
		errors,
		close: async () => {
			await context.close();
			rmSync(profile, { recursive: true, force: true });
		}
	};
}

/**
 * WCAG 2.2 AA problems axe-core finds on the page as it stands (rule id and where), run
 * through DevTools so the page's own script rules do not apply to it.
 */
export async function axeViolations(page: Page): Promise<string[]> {
	const source = readFileSync(createRequire(import.meta.url).resolve('axe-core/axe.min.js'), 'utf8');
	await page.evaluate(source);
	const violations = await page.evaluate(async () => {
		const axe = (window as unknown as { axe: { run: (c: unknown, o: unknown) => Promise<{ violations: { id: string; nodes: { target: string[] }[] }[] }> } }).axe;
		const r = await axe.run(document, { runOnly: { type: 'tag', values: ['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa', 'wcag22aa'] } });
		return r.violations.map((v) => `${v.id}: ${v.nodes.map((n) => n.target.join(' ')).slice(0, 3).join(', ')}`);
	});
	return violations;
}
