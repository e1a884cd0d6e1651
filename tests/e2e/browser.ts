/** Debian's Chromium through playwright-core (never a browser download). */
import { mkdirSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { chromium, type BrowserContext, type Page } from 'playwright-core';
import { afterAll, afterEach, beforeAll, expect } from 'vitest';
import { CHROMIUM_ARGS } from '../../scripts/lib/chromium';

export const PHONE = { width: 390, height: 844 };
export const SHOTS = path.resolve('screenshots');

/**
 * Debian's Chromium, headless, with a profile of its own (removed again on `close`) and
 * `options` (the window's size, touch).
 */
async function launch(options: { viewport: { width: number; height: number }; deviceScaleFactor?: number; isMobile?: boolean; hasTouch?: boolean }) {
	const profile = mkdtempSync(path.join(tmpdir(), 'fieldbench-e2e-'));
	const context = await chromium.launchPersistentContext(profile, {
		executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
		headless: true,
		...options,
		args: CHROMIUM_ARGS
	});
	const page = context.pages()[0] ?? (await context.newPage());
	const close = async () => {
		await context.close();
		rmSync(profile, { recursive: true, force: true });
	};
	return { context, page, close };
}

export async function openPhone(): Promise<{
	context: BrowserContext;
	page: Page;
	errors: string[];
	close: () => Promise<void>;
}> {
	const { context, page, close } = await launch({ viewport: PHONE, deviceScaleFactor: 2, isMobile: true, hasTouch: true });
	const errors: string[] = []; // uncaught errors in the page (a failed hydration shows here)
	watch(page, errors);
	return { context, page, errors, close };
}

type Phone = Awaited<ReturnType<typeof openPhone>>;

/**
 * One phone for the tests of a file: opened before them and closed after them; each test
 * fails on an uncaught error in the page. Its fields can be read once the tests run.
 */
export function phoneForFile(): Phone {
	let phone: Phone | null = null;
	const opened = () => {
		if (!phone) throw new Error('The phone opens before the first test.');
		return phone;
	};
	beforeAll(async () => {
		phone = await openPhone();
	});
	afterEach(() => {
		expect(opened().errors, 'uncaught errors in the page').toEqual([]);
	});
	afterAll(async () => {
		await phone?.close();
	});
	return {
		get context() {
			return opened().context;
		},
		get page() {
			return opened().page;
		},
		get errors() {
			return opened().errors;
		},
		close: () => opened().close()
	};
}

/**
 * Collect a page's uncaught errors and every Content-Security-Policy violation it logs (OWASP
 * ASVS 5.0 §3.4.3: the app must pass its own policy, service worker and font included).
 */
export function watch(page: Page, errors: string[]) {
	page.on('pageerror', (e) => errors.push(e.message));
	page.on('console', (m) => {
		if (/Content Security Policy|Content-Security-Policy/i.test(m.text())) errors.push(`CSP: ${m.text()}`);
	});
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

export const DESK = { width: 1280, height: 800 };

/** A browser at `size` (the phone's 390×844 with touch, or a desk's 1280×800 with a mouse). */
export async function openAt(size: 'phone' | 'desk') {
	if (size === 'phone') return openPhone();
	const { context, page, close } = await launch({ viewport: DESK });
	const errors: string[] = [];
	page.on('pageerror', (e) => errors.push(e.message));
	return { context, page, errors, close };
}
