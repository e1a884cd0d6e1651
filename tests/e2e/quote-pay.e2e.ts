/**
 * The customer says yes and pays on the driveway: the technician makes a quote with no
 * signal, syncs, shows the customer a link (as a QR code); the customer approves on their own
 * phone with their name, pays with the fake provider's test card on its page, and the lead
 * sees the job paid at the desk. Every screen of ours is checked with axe-core (WCAG 2.2 AA).
 * Prices are the demo's invented ones (seed/demo-pricing.ts): coil 38.40, labour 68.00 an
 * hour, diagnosis 45.00, 20 % tax; 38.40 + 0.5 × 68.00 + 45.00 = 117.40, tax 23.48, total
 * 140.88 (worked by hand).
 */
import { afterAll, afterEach, beforeAll, describe, expect, inject, it } from 'vitest';
import { DEMO_USERS, DEMO_WORKSHOP } from '../../src/lib/server/seed/demo';
import { axeViolations } from './axe';
import { openPhone, shot, signInAs } from './browser';

const base = inject('baseURL');
let JOB = '';
let LATE_JOB = '';
let tech: Awaited<ReturnType<typeof openPhone>>;
let customer: Awaited<ReturnType<typeof openPhone>>;

beforeAll(async () => {
	Object.assign(process.env, inject('dbEnv'));
	const { jobs } = await import('../../src/lib/server/services/jobs');
	const { closeDb } = await import('../../src/lib/server/db');
	const job = await jobs.create(
		{ userId: DEMO_USERS[1].id, workshopId: DEMO_WORKSHOP.id, role: 'lead', deviceId: 'e2e' },
		{ complaint: 'Misfire on the driveway, coil suspected', assigneeId: DEMO_USERS[2].id, status: 'testing' }
	);
	JOB = job.id as string;
	// A second job whose quote's link ran out a day ago (made 8 days back, open 7).
	const { quotes } = await import('../../src/lib/server/services/quotes');
	const { makeQuoteLink } = await import('../../src/lib/server/quotes/links');
	const lead = { userId: DEMO_USERS[1].id, workshopId: DEMO_WORKSHOP.id, role: 'lead' as const, deviceId: 'e2e' };
	const late = await jobs.create(lead, { complaint: 'Quote link ran out, coil still to fit', assigneeId: DEMO_USERS[2].id, status: 'testing' });
	LATE_JOB = late.id as string;
	const q = (await quotes.create(lead, { jobId: LATE_JOB, request: { diagnostic: true } })) as { id: string };
	await makeQuoteLink(lead, q.id, base, {}, new Date(Date.now() - 8 * 86_400_000));
	await closeDb();
	tech = await openPhone();
	customer = await openPhone();
});
afterEach(() => {
	expect(tech.errors, 'uncaught errors on the technician’s phone').toEqual([]);
	expect(customer.errors, 'uncaught errors on the customer’s phone').toEqual([]);
});
afterAll(async () => {
	await tech?.close();
	await customer?.close();
});

describe('quote, approval and payment', () => {
	let link = '';

	it('the technician makes the quote offline and shows it after a sync', async () => {
		const { page, context } = tech;
		await signInAs(tech, base, 'tech@tallowbridge.example');
		await page.waitForFunction(() => Boolean(navigator.serviceWorker.controller), null, { timeout: 20_000 });
		// The first sync after signing in brings the job; opening it before then finds nothing.
		await page.getByTestId('job-list').getByText('Misfire on the driveway, coil suspected').waitFor({ timeout: 20_000 });
		await page.goto(`${base}/field/job/${JOB}`);
		await page.getByRole('link', { name: 'Quote for the customer' }).click();
		await page.getByText('Pencil ignition coil TB-IC-2041').waitFor();
		await expect.poll(() => page.title()).toMatch(/^Quote · Job/);
		expect(await axeViolations(page)).toEqual([]);

		await context.setOffline(true);
		await page.getByText('Pencil ignition coil TB-IC-2041').click();
		await page.getByLabel('Labour').selectOption({ label: 'Fit one pencil coil (£68.00 an hour)' });
		await page.getByLabel('Time (hours)').fill('0.5');
		await expect.poll(() => page.getByTestId('quote-draft-totals').textContent()).toContain('£140.88');
		await page.getByRole('button', { name: 'Save the quote' }).click();
		await expect.poll(() => page.getByTestId('phone-quote-state').textContent()).toContain('waiting to send');
		await shot(page, 'quote-1-offline');

		await context.setOffline(false);
		await page.getByRole('button', { name: 'Show the customer' }).click();
		await page.getByTestId('quote-qr').waitFor({ timeout: 20_000 });
		link = (await page.getByTestId('quote-url').textContent())!.trim();
		expect(link).toMatch(/\/q\/[A-Za-z0-9_-]{43}$/);
		await expect.poll(() => page.getByTestId('phone-quote-total').textContent(), { timeout: 20_000 }).toContain('£140.88');
		expect(await axeViolations(page)).toEqual([]);
		await shot(page, 'quote-2-qr');
	});

	it('the customer approves on their phone and pays with the test card', async () => {
		const { page } = customer;
		await page.goto(link);
		expect(await page.getByTestId('quote-total').textContent()).toContain('£140.88');
		expect(await axeViolations(page)).toEqual([]);
		await page.getByRole('button', { name: /Approve the work/ }).click();
		await page.getByText('Type your name').first().waitFor();
		expect(await page.getByTestId('quote-answer').count()).toBe(0);
		await page.getByLabel('Your name').fill('Robin Ashgrove');
		await page.getByRole('button', { name: /Approve the work/ }).click();
		await page.getByTestId('quote-answer').waitFor();
		expect(await page.getByTestId('quote-answer').textContent()).toContain('Robin Ashgrove');
		expect(await axeViolations(page)).toEqual([]);
		await shot(page, 'quote-3-approved');

		await page.getByRole('button', { name: /Pay £140.88 by card/ }).click();
		await page.getByLabel('Card number').fill('4242 4242 4242 4242');
		await page.getByRole('button', { name: /Pay/ }).click();
		await page.waitForURL(/paid=1/);
		await expect.poll(async () => {
			await page.reload();
			return page.getByTestId('quote-paid').count();
		}, { timeout: 15_000 }).toBe(1);
		await shot(page, 'quote-4-paid');
	});

	it('the lead sees the job approved and paid', async () => {
		const lead = await openPhone();
		try {
			await signInAs(lead, base, 'lead@tallowbridge.example');
			await lead.page.goto(`${base}/jobs/${JOB}`);
			await lead.page.getByTestId('job-money').waitFor();
			expect(await lead.page.getByTestId('quote-state').textContent()).toBe('Approved');
			expect(await lead.page.getByTestId('quote-answered').textContent()).toContain('Robin Ashgrove');
			expect(await lead.page.getByTestId('payment-state').first().textContent()).toBe('Paid');
			expect(await lead.page.getByTestId('status-history').textContent()).toContain('The customer, on their link');
			expect(await axeViolations(lead.page)).toEqual([]);
			await lead.page.goto(`${base}/payments`);
			expect(await lead.page.getByTestId('paid-total').textContent()).toContain('£140.88');
			expect(await axeViolations(lead.page)).toEqual([]);
			await lead.page.goto(`${base}/jobs/${JOB}/money`);
			expect(await axeViolations(lead.page)).toEqual([]);

			// A partial refund: more than was paid is refused with the field named, then
			// 40.88 of 140.88 is refunded and 100.00 is kept (worked by hand).
			const amount = lead.page.getByLabel(/Amount to refund/);
			await amount.fill('200');
			await lead.page.getByRole('button', { name: 'Refund', exact: true }).click();
			await lead.page.getByText('At most £140.88: that is what is left to refund').waitFor();
			expect(await amount.getAttribute('aria-invalid')).toBe('true');
			expect(await axeViolations(lead.page)).toEqual([]);
			await amount.fill('40.88');
			await lead.page.getByRole('button', { name: 'Refund', exact: true }).click();
			await lead.page.getByTestId('refund-done').waitFor();
			await expect.poll(() => lead.page.getByTestId('payment-refunded').first().textContent()).toContain('Refunded £40.88 · kept £100.00');
			expect(await axeViolations(lead.page)).toEqual([]);
			await shot(lead.page, 'quote-6-refund');
			await lead.page.goto(`${base}/payments`);
			await lead.page.getByTestId('list-count').waitFor();
			expect(await lead.page.getByTestId('paid-total').textContent()).toContain('£100.00');
			expect(await lead.page.getByTestId('payment-cards').textContent()).toContain('Refunded £40.88');
			expect(await axeViolations(lead.page)).toEqual([]);

			await lead.page.goto(`${base}/pricing`);
			expect(await axeViolations(lead.page)).toEqual([]);
			await shot(lead.page, 'quote-5-pricing');
			expect(lead.errors).toEqual([]);
		} finally {
			await lead.close();
		}
	});

	it('the technician’s phone says a link ran out and shows a fresh one', async () => {
		const { page } = tech;
		await signInAs(tech, base, 'tech@tallowbridge.example');
		await page.getByTestId('job-list').getByText('Quote link ran out, coil still to fit').waitFor({ timeout: 20_000 });
		await page.goto(`${base}/field/job/${LATE_JOB}/quote`);
		await page.getByTestId('phone-link-expired').waitFor({ timeout: 20_000 });
		expect(await page.getByTestId('phone-link-expired').textContent()).toContain('The approval link has expired');
		expect(await axeViolations(page)).toEqual([]);
		await page.getByRole('button', { name: 'Show a fresh link' }).click();
		await page.getByTestId('quote-qr').waitFor({ timeout: 20_000 });
		expect(await page.getByTestId('phone-link-expired').count()).toBe(0);
		const fresh = (await page.getByTestId('quote-url').textContent())!.trim();
		expect((await fetch(fresh)).status).toBe(200);
		await shot(page, 'quote-7-fresh-link');
	});
});
