import { describe, expect, inject, it } from 'vitest';
import { DEMO_USERS } from '../../src/lib/server/seed/demo';
import { axeViolations } from './axe';
import { phoneForFile, shot, signInAs } from './browser';

const base = inject('baseURL'); // http://localhost:PORT
const numeric = base.replace('//localhost:', '//127.0.0.1:');
const phone = phoneForFile();

describe('the start page at phone size', () => {
	it('says what Fieldbench does, how to put it on the home screen, and offers sign-in', async () => {
		const { page, context } = phone;
		await context.clearCookies();
		await page.goto(base);
		await expect.poll(() => page.locator('h1').textContent()).toBe('Fieldbench');
		const what = (await page.getByTestId('what').textContent())!.replace(/\s+/g, ' ');
		expect(what).toContain('each reading judged against the part');
		expect(what).toContain('with or without signal');
		const homeScreen = page.getByRole('region', { name: "Put it on your phone's home screen" });
		expect(await homeScreen.textContent()).toContain('Add to Home Screen');
		expect(await homeScreen.textContent()).toContain('Add to home screen');
		const signIn = page.getByRole('link', { name: 'Sign in' });
		expect(await signIn.getAttribute('href')).toBe('/sign-in');
		const box = (await signIn.boundingBox())!;
		expect(box.height).toBeGreaterThanOrEqual(56);
		expect(box.y + box.height, 'Sign in within thumb reach, no scrolling').toBeLessThanOrEqual(844);
		// The signed-out start page is for people: nothing about the server.
		expect(await page.locator('body').textContent()).not.toMatch(/database|migration|status/i);
		const width = await page.evaluate(() => document.documentElement.scrollWidth);
		expect(width).toBeLessThanOrEqual(390);
		const font = await page.evaluate(() => getComputedStyle(document.body).fontFamily);
		expect(font).toContain('Roboto Condensed');
		await shot(page, 'start-phone');
	});

	it("passes axe-core's WCAG 2.2 A and AA rules", async () => {
		const { page, context } = phone;
		await context.clearCookies();
		await page.goto(base);
		await page.locator('h1').waitFor();
		expect(await axeViolations(page)).toEqual([]);
	});

	it('has an accessibility check that finds a broken rule (a page made to break two)', async () => {
		const { page } = phone;
		await page.setContent('<main><img src="/favicon.svg"><a href="/sign-in"></a></main>');
		const found = await axeViolations(page);
		expect(found.join('\n')).toContain('image-alt');
		expect(found.join('\n')).toContain('link-name');
	});

	it("sends a signed-in visitor on to the phone's home, /field", async () => {
		const { page } = phone;
		await signInAs(phone, base, DEMO_USERS[2].email);
		await page.goto(base);
		await page.waitForURL(`${base}/field`);
	});

	it('answers the health check with the database and migrations', async () => {
		const r = await fetch(`${base}/api/health`);
		expect(r.status).toBe(200);
		const body = await r.json();
		expect(body).toMatchObject({ ok: true, db: 'up', migrations: { pending: [] } });
		expect(body.migrations.applied).toBeGreaterThanOrEqual(2);
	});
});

describe('the installed app at 127.0.0.1', () => {
	it('signs in through the form and works offline there as at localhost', async () => {
		const { page, context } = phone;
		await signInAs(phone, numeric, DEMO_USERS[2].email);
		expect(await page.locator('link[rel=manifest]').count()).toBe(1);
		await page.getByTestId('job-list').getByText('Job 1001').waitFor();
		// Installable there too, and the service worker takes the page, so the phone's screens
		// open with no signal.
		const state = () =>
			page.evaluate(async () => (await navigator.serviceWorker.ready).active?.state);
		await expect.poll(state, { timeout: 15_000 }).toBe('activated');
		await expect
			.poll(() => page.evaluate(() => Boolean(navigator.serviceWorker.controller)), {
				timeout: 15_000
			})
			.toBe(true);
		const cdp = await context.newCDPSession(page);
		const { installabilityErrors } = (await cdp.send('Page.getInstallabilityErrors')) as {
			installabilityErrors: unknown[];
		};
		expect(installabilityErrors).toEqual([]);
		await context.setOffline(true);
		try {
			await page.reload();
			await expect.poll(() => page.getByTestId('job-list').textContent()).toContain('Job 1001');
		} finally {
			await context.setOffline(false);
		}
	});
});
