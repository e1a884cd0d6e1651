/**
 * The app against its own Content-Security-Policy in Chromium (OWASP ASVS 5.0 §3.4.3): every
 * screen opens with the service worker and the shipped font and logs no violation (the
 * watcher in browser.ts fails any e2e test on one), while a script injected into a page is
 * blocked and reported. And the password form (§6.2.3, §7.4.3) as a user meets it.
 */
import { afterAll, afterEach, beforeAll, describe, expect, inject, it } from 'vitest';
import { DEMO_PASSWORD } from '../../src/lib/server/seed/demo';
import { openPhone, shot, signInAs } from './browser';

const base = inject('baseURL');
const JOB_1001 = '019a0000-0000-7000-8000-000000000301';
let phone: Awaited<ReturnType<typeof openPhone>>;

beforeAll(async () => {
	phone = await openPhone();
});
afterEach(() => {
	expect(phone.errors, 'uncaught errors or policy violations in the page').toEqual([]);
});
afterAll(async () => {
	await phone?.close();
});

describe('the content security policy in Chromium', () => {
	it('lets every screen run with its service worker and the shipped font, and logs no violation', async () => {
		const { page } = phone;
		await signInAs(phone, base, 'lead@tallowbridge.example');
		await page.waitForFunction(() => Boolean(navigator.serviceWorker.controller), null, { timeout: 20_000 });
		for (const path of ['/field', `/field/job/${JOB_1001}`, '/field/sync', '/field/meters', '/jobs', `/jobs/${JOB_1001}`, '/customers', '/vehicles', '/library', '/team', '/password', '/sign-out']) {
			await page.goto(base + path);
			await page.waitForLoadState('networkidle');
			// The phone's pages draw from IndexedDB after the load, so the bold face may come a moment later.
			await expect
				.poll(async () => [path, await page.evaluate(async () => (await document.fonts.ready, document.fonts.check('700 20px "Roboto Condensed"')))], { timeout: 10_000 })
				.toEqual([path, true]);
		}
		// The prerendered shell, answered by the service worker with no signal.
		await phone.context.setOffline(true);
		expect((await page.goto(`${base}/field/meters`))?.fromServiceWorker()).toBe(true);
		await page.getByRole('heading').first().waitFor();
		await phone.context.setOffline(false);
	});

	it('blocks a script injected into a page and reports it', async () => {
		const { page } = phone;
		await page.goto(`${base}/field`);
		const ran = await page.evaluate(async () => {
			const s = document.createElement('script');
			s.textContent = 'window.__injected = true';
			document.body.append(s);
			await new Promise((r) => setTimeout(r, 100));
			return (window as unknown as { __injected?: boolean }).__injected ?? false;
		});
		expect(ran).toBe(false);
		await expect.poll(() => phone.errors.filter((e) => e.startsWith('CSP:')).length).toBe(1);
		phone.errors.length = 0; // the one violation this test caused on purpose
	});
});

describe('changing the password', () => {
	it('asks for the current one, explains a refusal, and confirms the change', async () => {
		const { page } = phone;
		await signInAs(phone, base, 'apprentice@tallowbridge.example');
		await page.goto(`${base}/password`);
		await page.getByLabel('Current password').fill('not-my-password');
		await page.getByLabel('New password', { exact: true }).fill('a-brand-new-password-7');
		await page.getByLabel('New password again').fill('a-brand-new-password-7');
		await page.getByRole('button', { name: 'Change password' }).click();
		await page.getByText('That is not your current password').waitFor();
		await shot(page, 'password-1-refused');

		const change = async (from: string, to: string) => {
			await page.getByLabel('Current password').fill(from);
			await page.getByLabel('New password', { exact: true }).fill(to);
			await page.getByLabel('New password again').fill(to);
			await page.getByRole('button', { name: 'Change password' }).click();
			await page.getByTestId('password-changed').waitFor();
		};
		await change(DEMO_PASSWORD, 'a-brand-new-password-7');
		await shot(page, 'password-2-changed');
		expect(await page.getByTestId('password-changed').textContent()).toContain('signed out everywhere else');
		await change('a-brand-new-password-7', DEMO_PASSWORD); // the demo password again, for the other tests
	});
});
