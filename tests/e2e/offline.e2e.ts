import { describe, expect, inject, it } from 'vitest';
import { freePort, serve } from '../../scripts/lib/app';
import { portFree } from '../../scripts/lib/mariadb';
import { phoneForFile, shot, signInAs } from './browser';

const base = inject('baseURL');
const JOB_1001 = '019a0000-0000-7000-8000-000000000301'; // seeded for the demo technician

const phone = phoneForFile();

const badge = () => phone.page.getByTestId('sync-badge');

describe('the offline app', () => {
	it('installs: the service worker is active and Chromium reports no installability errors', async () => {
		const { page } = phone;
		await signInAs(phone, base, 'tech@tallowbridge.example');
		await page.getByTestId('job-list').getByText('Job 1001').waitFor();
		const state = () => page.evaluate(async () => (await navigator.serviceWorker.ready).active?.state);
		await expect.poll(state, { timeout: 15_000 }).toBe('activated');
		await expect.poll(() => page.evaluate(() => Boolean(navigator.serviceWorker.controller)), { timeout: 15_000 }).toBe(true);
		const cdp = await page.context().newCDPSession(page);
		const { installabilityErrors } = (await cdp.send('Page.getInstallabilityErrors')) as { installabilityErrors: unknown[] };
		expect(installabilityErrors).toEqual([]);
		await shot(page, 'offline-1-home-online');
	});

	it('says plainly when the browser refuses persistent storage', async () => {
		const { page } = phone;
		// Headless Chromium refuses navigator.storage.persist().
		await page.getByTestId('persist-refused').waitFor();
		expect(await page.getByTestId('persist-refused').textContent()).toContain('live only on this phone');
	});

	it('reloads a job’s deep URL with no signal and takes a status change and a note', async () => {
		const { page, context } = phone;
		await page.goto(`${base}/field/job/${JOB_1001}`);
		await page.getByTestId('complaint').waitFor();
		await context.setOffline(true);
		const answer = await page.reload();
		expect(answer?.fromServiceWorker(), 'the page came from the service worker').toBe(true);
		await expect.poll(() => page.getByTestId('complaint').textContent()).toContain('Misfire at idle');
		await shot(page, 'offline-2-job-reloaded-offline');

		await page.getByLabel('Status').selectOption('testing');
		await page.getByLabel('New note').fill('Coil 3 boot cracked, tracking marks');
		await page.getByRole('button', { name: 'Add note' }).click();
		await expect.poll(() => badge().textContent()).toContain('2 waiting to send');
		await shot(page, 'offline-3-edited-offline');

		expect((await page.reload())?.fromServiceWorker()).toBe(true);
		await expect.poll(() => page.getByTestId('notes').textContent()).toContain('Coil 3 boot cracked');
		expect(await page.getByLabel('Status').inputValue()).toBe('testing');
		expect(await badge().textContent()).toContain('2 waiting to send');
		await shot(page, 'offline-4-reloaded-offline');
		await badge().click();
		await page.waitForURL(`${base}/field/sync`);
		await expect.poll(() => page.getByTestId('waiting').locator('li').count()).toBe(2);
		await shot(page, 'offline-5-waiting-to-send');
	});

	it('drains the outbox when the connection returns, and the server holds the change', async () => {
		const { page, context } = phone;
		await context.setOffline(false);
		await page.getByRole('button', { name: 'Sync now' }).click();
		await expect.poll(() => badge().textContent(), { timeout: 20_000 }).toContain('All sent');
		await shot(page, 'offline-6-synced');
		await page.getByText('Everything on this phone has been sent').waitFor(); // the list re-reads after the badge
		const r = await page.request.get(`${base}/api/jobs/${JOB_1001}`);
		expect(r.status()).toBe(200);
		const { job } = await r.json();
		expect(job.status).toBe('testing');
		expect(job.notes).toContain('Coil 3 boot cracked');
	});

	it('opens a deep URL never visited before with the app server stopped, from the service worker', async () => {
		// A second app server on its own port (a new origin for the browser), on the same database.
		const port = await freePort(4500);
		const second = await serve(port, inject('dbEnv'), 'ignore');
		const { page, context } = phone;
		try {
			await context.setOffline(false);
			await signInAs(phone, second.url, 'tech@tallowbridge.example');
			await page.getByTestId('job-list').getByText('Job 1001').waitFor();
			await expect.poll(() => page.evaluate(() => Boolean(navigator.serviceWorker.controller)), { timeout: 20_000 }).toBe(true);
		} finally {
			process.kill(-second.child.pid!, 'SIGKILL');
		}
		await expect.poll(() => portFree(port), { timeout: 10_000 }).toBe(true);
		// The browser is online; the server is gone. This job's page was never opened here.
		const answer = await page.goto(`${second.url}/field/job/${JOB_1001}`);
		expect(answer?.fromServiceWorker(), 'the page came from the service worker').toBe(true);
		await expect.poll(() => page.getByTestId('complaint').textContent(), { timeout: 15_000 }).toContain('Misfire at idle');
		await shot(page, 'offline-7-server-stopped');
	});
});
