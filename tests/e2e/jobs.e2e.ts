/**
 * Jobs, customers and vehicles at phone size: the demo technician adds a customer, a vehicle
 * and a job through the forms and finds the job in the table after a reload.
 *
 * VIN reference: 1M8GDM9AXKP042788 is the check-digit worked example of the Wikipedia article
 * "Vehicle identification number" (check digit X); with position 9 changed to 1 the check
 * digit no longer matches, which the app shows as a warning and accepts.
 */
import type { Page } from 'playwright-core';
import { afterAll, afterEach, beforeAll, describe, expect, inject, it } from 'vitest';
import { DEMO_PASSWORD } from '../../src/lib/server/seed/demo';
import { openPhone, PHONE, shot } from './browser';

const base = inject('baseURL');
const WRONG_CHECK_DIGIT = '1M8GDM9A1KP042788';
const run = Date.now().toString(36).toUpperCase();
const CUSTOMER = `Odile Farthing ${run}`;
const COMPLAINT = `Hesitates under load ${run}`;

let phone: Awaited<ReturnType<typeof openPhone>>;
let jobUrl = '';
beforeAll(async () => {
	phone = await openPhone();
	const { page } = phone;
	page.setDefaultTimeout(15_000);
	await page.goto(`${base}/sign-in?next=/jobs`);
	await page.getByLabel('E-mail', { exact: true }).fill('tech@tallowbridge.example');
	await page.getByLabel('Password').fill(DEMO_PASSWORD);
	await page.getByRole('button', { name: 'Sign in' }).click();
	await page.waitForURL(`${base}/jobs`);
});
afterEach(() => {
	expect(phone.errors, 'uncaught errors in the page').toEqual([]);
});
afterAll(async () => {
	await phone?.close();
});

/** Fails on sideways scrolling and on visible buttons, links and fields under 56 px tall. */
async function expectPhoneFit(page: Page, width = PHONE.width) {
	expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(
		width
	);
	const small = await page.$$eval(
		'main a, main button, main input:not([type=checkbox]):not([type=hidden]), main select, nav a, summary',
		(els) =>
			els
				.filter((e) => (e as HTMLElement).offsetParent !== null)
				.map((e) => ({
					text: (e.textContent ?? e.getAttribute('name'))?.trim(),
					h: e.getBoundingClientRect().height
				}))
				.filter((x) => x.h < 56)
	);
	expect(small).toEqual([]);
}

describe('jobs, customers and vehicles at phone size', () => {
	it('shows the jobs table with the technician’s open jobs and the sync badge', async () => {
		const { page } = phone;
		await page.getByTestId('job-cards').getByText('Job 1001').waitFor();
		await page.getByTestId('sync-badge').waitFor();
		await expectPhoneFit(page);
		await shot(page, 'office-1-jobs-phone');
	});

	it('keeps what was typed and names the field when a customer is refused', async () => {
		const { page } = phone;
		await page.getByRole('link', { name: 'Customers' }).click();
		await page.waitForURL(`${base}/customers`);
		await page.getByRole('link', { name: 'New customer' }).click();
		await page.waitForURL(`${base}/customers/new`);
		await page.getByLabel('Name').fill(CUSTOMER);
		await page.getByLabel('Phone').fill('0100 555 0163');
		await page.getByLabel('E-mail', { exact: true }).fill('not an address');
		await page.getByRole('button', { name: 'Save customer' }).click();
		await expect.poll(() => page.locator('#f-email-err').textContent()).toContain('e-mail address');
		expect(await page.getByLabel('Name').inputValue()).toBe(CUSTOMER);
		expect(await page.getByLabel('Phone').inputValue()).toBe('0100 555 0163');
		await expectPhoneFit(page);
		await shot(page, 'office-2-customer-invalid');
	});

	it('adds the customer', async () => {
		const { page } = phone;
		await page.getByLabel('E-mail', { exact: true }).fill('odile@example.org');
		await page.getByText('Send reports by e-mail').click();
		await page.getByRole('button', { name: 'Save customer' }).click();
		await page.waitForURL(/\/customers\/[0-9a-f-]{36}$/);
		expect(await page.getByLabel('Name').inputValue()).toBe(CUSTOMER);
		expect(await page.getByLabel('Send reports by e-mail').isChecked()).toBe(true);
		await expectPhoneFit(page);
		await shot(page, 'office-3-customer');
	});

	it('adds a vehicle for the customer, warning about the VIN check digit but accepting it', async () => {
		const { page } = phone;
		await page.getByRole('link', { name: 'Add a vehicle' }).click();
		await page.waitForURL(/\/vehicles\/new\?customer=/);
		await page.getByLabel('VIN', { exact: true }).fill(WRONG_CHECK_DIGIT.replace('KP', 'IP'));
		await expect.poll(() => page.getByTestId('vin-check').textContent()).toContain('letter I');
		await page.getByLabel('VIN', { exact: true }).fill(WRONG_CHECK_DIGIT);
		await page.getByTestId('vin-warning').waitFor();
		await page.getByLabel('Plate').fill(`E2 ${run.slice(-5)}`);
		await page.getByLabel('Make').fill('Tessaly');
		await page.getByLabel('Model').fill('Ondrava');
		await page.getByLabel('Year').fill('2021');
		await page.getByLabel('Odometer').fill('41 250');
		await page.getByText('Hybrid or electric').click();
		expect(await page.getByLabel('Owner').inputValue()).not.toBe('');
		await expectPhoneFit(page);
		await shot(page, 'office-4-vehicle-new-vin-warning');
		await page.getByRole('button', { name: 'Save vehicle' }).click();
		await page.waitForURL(/\/vehicles\/[0-9a-f-]{36}$/);
		await page.getByTestId('hv-banner').waitFor();
		expect(await page.getByTestId('vin-warning-saved').textContent()).toContain('check digit');
		expect(await page.locator('main').textContent()).toContain(CUSTOMER);
		await expectPhoneFit(page);
		await shot(page, 'office-5-vehicle');
	});

	it('opens a job on the vehicle, moves its status and records a fault code', async () => {
		const { page } = phone;
		await page.getByRole('link', { name: 'Book in a job on this vehicle' }).click();
		await page.waitForURL(/\/jobs\/new\?vehicle=/);
		await page.getByTestId('hv-banner').waitFor();
		await page.getByRole('button', { name: 'Book in the job' }).click();
		await expect.poll(() => page.locator('#f-complaint-err').textContent()).toContain('complaint');
		await page.getByLabel('Complaint').fill(COMPLAINT);
		await page.getByLabel('Location').fill('Bay 2');
		await expectPhoneFit(page);
		await shot(page, 'office-6-job-new');
		await page.getByRole('button', { name: 'Book in the job' }).click();
		await page.waitForURL(/\/jobs\/[0-9a-f-]{36}$/);
		jobUrl = page.url();
		expect(await page.getByTestId('job-number').textContent()).toMatch(/Job \d+/);
		expect(await page.locator('main').textContent()).toContain(CUSTOMER); // the vehicle's owner

		await page.getByRole('button', { name: 'Move to: Testing' }).click();
		await expect.poll(() => page.getByTestId('status').first().textContent()).toContain('Testing');
		const history = page.getByTestId('status-history').locator('li');
		await expect.poll(() => history.count()).toBe(2);
		expect(await history.first().textContent()).toContain('Sanna Velloway');

		const before = page.getByTestId('codes-before');
		await before.getByLabel('Code').fill('p0302');
		await before.getByLabel('What it says').fill('Cylinder 2 misfire detected');
		await before.getByRole('button', { name: 'Add code' }).click();
		await expect.poll(() => before.locator('li').first().textContent()).toContain('P0302');
		expect(await before.getByLabel('Code').inputValue()).toBe('');
		await expectPhoneFit(page);
		await shot(page, 'office-7-job');
	});

	it('shows a clash as "changed by someone else" with both values', async () => {
		const { page, context } = phone;
		const id = jobUrl.split('/').pop()!;
		const current = await (await context.request.get(`${base}/api/jobs/${id}`)).json();
		const r = await context.request.patch(`${base}/api/jobs/${id}`, {
			data: { baseVersion: current.job.version, location: 'Customer’s driveway' }
		});
		expect(r.status()).toBe(200);
		await page.getByLabel('Location').fill('Bay 4');
		await page.getByRole('button', { name: 'Save details' }).click();
		const notice = page.getByTestId('conflict');
		await notice.waitFor();
		expect(await notice.textContent()).toContain('Changed by someone else');
		expect(await notice.getByTestId('theirs').first().textContent()).toBe('Customer’s driveway');
		expect(await notice.getByTestId('yours').first().textContent()).toBe('Bay 4');
		expect(await page.getByLabel('Location').inputValue()).toBe('Bay 4');
		await notice.scrollIntoViewIfNeeded();
		await shot(page, 'office-8-job-conflict');
		await page.getByRole('button', { name: 'Save details' }).click();
		await expect.poll(() => page.getByText('Saved.').count()).toBeGreaterThan(0);
		expect(await page.getByTestId('conflict').count()).toBe(0);
	});

	it('finds the new job in the table, again after a reload and after going back', async () => {
		const { page } = phone;
		await page.getByRole('link', { name: 'Jobs', exact: true }).click();
		await page.waitForURL(`${base}/jobs`);
		await page.getByLabel('Search jobs').fill(run);
		await page.getByRole('button', { name: 'Search' }).click();
		await page.waitForURL(`${base}/jobs?q=${run}`);
		const cards = page.getByTestId('job-cards');
		await cards.getByText(COMPLAINT).waitFor();
		await page.reload();
		await cards.getByText(COMPLAINT).waitFor();
		expect(await page.getByLabel('Search jobs').inputValue()).toBe(run);
		expect(await cards.locator('li').count()).toBe(1);
		await shot(page, 'office-9-jobs-found-after-reload');

		await cards.getByText(COMPLAINT).click();
		await page.waitForURL(jobUrl);
		await page.goBack();
		await page.waitForURL(`${base}/jobs?q=${run}`);
		await cards.getByText(COMPLAINT).waitFor();
	});

	it('keeps filters in the URL and says when nothing matches', async () => {
		const { page } = phone;
		await page.goto(`${base}/jobs?q=${run}&status=closed`);
		await page.getByTestId('list-empty').waitFor();
		expect(await page.getByTestId('list-empty').textContent()).toContain('No jobs match');
		await shot(page, 'office-10-jobs-empty');
		await page.goto(`${base}/jobs?status=finished`);
		await page.getByRole('alert').filter({ hasText: 'Could not load the jobs' }).waitFor();
		await shot(page, 'office-11-jobs-error');
	});

	it('lists the vehicle with its hybrid flag and the customer in their tables', async () => {
		const { page } = phone;
		await page.goto(`${base}/vehicles?q=${run.slice(-5)}`);
		await page.getByTestId('vehicle-cards').getByText('Hybrid/EV').waitFor();
		await expectPhoneFit(page);
		await shot(page, 'office-12-vehicles-phone');
		await page.goto(`${base}/customers?q=${run}`);
		await page.getByTestId('customer-cards').getByText(CUSTOMER).waitFor();
		await expectPhoneFit(page);
		await shot(page, 'office-13-customers-phone');
	});

	it('shows a table without sideways scrolling at 1,280 px', async () => {
		const { page } = phone;
		await page.setViewportSize({ width: 1280, height: 900 });
		await page.goto(`${base}/jobs?q=${run}&status=all`);
		await page.getByTestId('job-table').getByText(COMPLAINT).waitFor();
		expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(
			1280
		);
		await shot(page, 'office-14-jobs-desktop');
		await page.goto(jobUrl);
		await page.getByTestId('job-number').waitFor();
		expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(
			1280
		);
		await shot(page, 'office-15-job-desktop');
		for (const [path, table] of [
			['/vehicles', 'vehicle-table'],
			['/customers', 'customer-table']
		]) {
			await page.goto(`${base}${path}?q=${run.slice(-5)}`);
			await page.getByTestId(table).locator('tbody tr').first().waitFor();
			expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(
				1280
			);
			await shot(page, `office-16-${path.slice(1)}-desktop`);
		}
		await page.setViewportSize(PHONE);
	});
});
