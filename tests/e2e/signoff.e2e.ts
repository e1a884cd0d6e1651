/**
 * Sign-off of apprentice work, end to end: the demo apprentice records a coil test offline on
 * their phone and syncs; the lead sees it waiting (the Sign-offs page and its count), reads it
 * on the office job page and signs it off from the desk; the apprentice's phone shows it
 * signed after its next sync. Then a second test sent back with a note that the apprentice
 * reads on the job list, signed off after all on the lead's own phone at the car (offline,
 * "witnessed"); an apprentice's relay test signed off the same way on the lead's phone; and
 * the Re-test button, which starts a test with the same part. The new
 * screens pass axe-core's WCAG 2.2 AA rules at phone and desk size.
 *
 * Figures: the demo coil's invented spec (seed): primary cold 0.38–0.58 Ω, secondary cold
 * 8.8–14.6 kΩ; the leads read 0.2 Ω: 0.62 Ω read → 0.42 Ω OK; 12.1 kΩ OK.
 */
import type { Page } from 'playwright-core';
import { v7 as uuidv7 } from 'uuid';
import { afterAll, afterEach, beforeAll, describe, expect, inject, it } from 'vitest';
import { defaultsFor } from '../../src/lib/flow/circuit';
import { DEMO_USERS } from '../../src/lib/server/seed/demo';
import { axeViolations } from './axe';
import { openAt, openPhone, shot, signInAs } from './browser';
import { openFieldJob, syncPhone } from './phone-steps';

const base = inject('baseURL');
const APPRENTICE = DEMO_USERS.find((u) => u.role === 'apprentice')!;
const LEAD = DEMO_USERS.find((u) => u.role === 'lead')!;
const COIL = '019a0000-0000-7000-8000-000000000401'; // the demo coil and its approved sheet
const SHEET = '019a0000-0000-7000-8000-000000000501';
let desk: Awaited<ReturnType<typeof openAt>>;
let phone: Awaited<ReturnType<typeof openPhone>>;
let leadPhone: Awaited<ReturnType<typeof openPhone>>;
let jobId = '';
let jobNumber = 0;
let first = ''; // recorded offline, signed off at the desk
let second = ''; // sent back, then signed off at the car

beforeAll(async () => {
	[desk, phone, leadPhone] = await Promise.all([openAt('desk'), openPhone(), openPhone()]);
	for (const b of [desk, phone, leadPhone]) b.page.setDefaultTimeout(20_000);
	await signInAs(desk, base, LEAD.email);
	const r = await desk.page.request.post(`${base}/api/jobs`, {
		data: { complaint: `Misfire under load ${Date.now().toString(36)}`, assigneeId: APPRENTICE.id }
	});
	expect(r.status()).toBe(201);
	({ id: jobId, number: jobNumber } = (await r.json()).job);
	await Promise.all([
		signInAs(phone, base, APPRENTICE.email),
		signInAs(leadPhone, base, LEAD.email)
	]);
});
afterEach(() => {
	for (const b of [desk, phone, leadPhone])
		expect(b.errors, 'uncaught errors in the page').toEqual([]);
});
afterAll(async () => {
	await Promise.all([desk?.close(), phone?.close(), leadPhone?.close()]);
});

const syncNow = (page: Page) => syncPhone(page, base);
const openJob = (page: Page) => openFieldJob(page, base, jobId);
const stateOf = (page: Page, testId: string) =>
	page.locator(`#test-${testId}`).getByTestId('signoff-state').getAttribute('data-signoff');
const expectAccessible = async (page: Page, where: string) =>
	expect(await axeViolations(page), where).toEqual([]);
async function type(page: Page, text: string) {
	for (const ch of text) {
		const name = ch === ',' || ch === '.' ? 'Decimal separator' : ch;
		await page.getByTestId('keypad').getByRole('button', { name, exact: true }).click();
	}
}

describe('an apprentice’s test signed off from the desk', () => {
	it('is recorded offline on the apprentice’s phone and waits for sign-off', async () => {
		const { page, context } = phone;
		await syncNow(page);
		await expect
			.poll(() => page.evaluate(() => Boolean(navigator.serviceWorker.controller)), {
				timeout: 15_000
			})
			.toBe(true);
		await openJob(page);
		await context.setOffline(true);
		await page.goto(`${base}/field/job/${jobId}/test/new`);
		await page.getByLabel('Part number as read off the part').fill('TB-IC');
		await page
			.getByTestId('parts')
			.getByRole('button', { name: /TB-IC-2041/ })
			.click();
		for (const c of ['2', '3', '4'])
			await page.getByRole('button', { name: c, exact: true }).click();
		await page.getByLabel('Lead resistance in ohms').fill('0,2');
		await page.getByRole('button', { name: 'Stood overnight' }).click();
		await page.getByRole('button', { name: 'Start the test' }).click();
		await page.waitForURL(/\/test\/[0-9a-f-]{36}$/);
		first = page.url().split('/').pop()!;
		await type(page, '0,62');
		await page.getByRole('button', { name: 'Save ▸' }).click();
		await type(page, '12,1');
		await page.getByRole('button', { name: 'Save ▸' }).click();
		await page.getByRole('heading', { name: 'Results' }).waitFor();
		await page.getByRole('button', { name: 'Finish the test' }).click();
		await page.getByText('Test finished').waitFor();
		// Still offline: the phone already says the test waits for a lead.
		await openJob(page);
		expect(await stateOf(page, first)).toBe('waiting');
		await context.setOffline(false);
		await syncNow(page);
		await page.goto(`${base}/field`);
		const card = page
			.getByTestId('job-list')
			.getByRole('link', { name: new RegExp(`Job ${jobNumber}`) });
		await expect
			.poll(() => card.getByTestId('job-waiting').innerText())
			.toContain('Waiting for sign-off: TB-IC-2041');
		await expectAccessible(page, 'the apprentice’s job list');
		await shot(page, 'signoff-1-apprentice-waiting');
	});

	it('shows in the lead’s Sign-offs at the desk, with the count in the navigation', async () => {
		const { page } = desk;
		await page.goto(`${base}/signoffs`);
		const item = page.getByTestId('due-test').filter({ hasText: `Job ${jobNumber}` });
		await item.waitFor();
		expect(await item.innerText()).toContain(APPRENTICE.name);
		expect(
			Number((await page.getByTestId('signoffs-count').innerText()).replace(/\D/g, ''))
		).toBeGreaterThanOrEqual(1);
		await expectAccessible(page, 'Sign-offs at desk size');
		await shot(page, 'signoff-2-desk-list');
		await item.getByRole('link', { name: /Read and sign off/ }).click();
		await page.waitForURL(new RegExp(`/jobs/${jobId}`));
		expect(await stateOf(page, first)).toBe('waiting');
		await expectAccessible(page, 'the office job page with a test to sign off');
		await page.locator(`#test-${first}`).scrollIntoViewIfNeeded();
		await shot(page, 'signoff-3-desk-waiting');
	});

	it('is signed off remotely by the lead, the signer being the lead', async () => {
		const { page } = desk;
		const detail = page.locator(`#test-${first}`);
		await detail.getByRole('button', { name: 'Sign off', exact: true }).click();
		await expect.poll(() => stateOf(page, first)).toBe('signed');
		expect(await detail.getByTestId('signoff-detail').innerText()).toContain(
			`Signed off by ${LEAD.name} (Workshop lead) · read at the desk`
		);
		expect(await detail.getByTestId('signoff-form').count()).toBe(0);
		await shot(page, 'signoff-4-desk-signed');
	});

	it('shows signed on the apprentice’s phone after the next sync', async () => {
		const { page } = phone;
		await syncNow(page);
		await openJob(page);
		await expect.poll(() => stateOf(page, first)).toBe('signed');
		// The signer's name once the phone has the workshop's people (fetched as the page opens).
		await expect
			.poll(() => page.locator(`#test-${first}`).getByTestId('signoff-detail').innerText())
			.toContain(LEAD.name);
		await expectAccessible(page, 'the apprentice’s job page');
		await page.locator(`#test-${first}`).scrollIntoViewIfNeeded();
		await shot(page, 'signoff-5-apprentice-signed');
		await page.goto(`${base}/field`);
		const card = page
			.getByTestId('job-list')
			.getByRole('link', { name: new RegExp(`Job ${jobNumber}`) });
		await expect
			.poll(() => card.getByTestId('job-signed').innerText())
			.toContain('1 test signed off');
	});
});

describe('a test sent back, then signed off at the car', () => {
	it('is sent back from the desk with a note the apprentice reads on the job list and the job', async () => {
		second = uuidv7();
		const now = new Date().toISOString();
		const ops = [
			{
				opId: uuidv7(),
				entity: 'test',
				entityId: second,
				kind: 'create',
				baseVersion: 0,
				deviceTime: now,
				fields: {
					jobId,
					componentId: COIL,
					sheetId: SHEET,
					partNumber: 'TB-IC-2041',
					position: '2',
					meter: {
						name: 'Bench meter',
						ranges: [{ label: '200 Ω', resolution: 0.01, pctOfReading: 0.5, counts: 2 }],
						leadResistance: 0.2,
						relativeMode: false
					},
					temperature: { mode: 'overnight' },
					state: 'done'
				}
			},
			{
				opId: uuidv7(),
				entity: 'reading',
				entityId: uuidv7(),
				kind: 'create',
				baseVersion: 0,
				deviceTime: now,
				fields: {
					testId: second,
					checkKey: 'primary',
					position: '2',
					samples: [{ value: 0.64, unit: 'Ω' }],
					rangeLabel: '200 Ω'
				}
			}
		];
		const r = await phone.page.request.post(`${base}/api/sync/push`, {
			data: { deviceId: uuidv7(), ops }
		});
		expect((await r.json()).results.map((x: { status: string }) => x.status)).toEqual([
			'applied',
			'applied'
		]);

		const { page } = desk;
		await page.goto(`${base}/jobs/${jobId}`);
		const detail = page.locator(`#test-${second}`);
		await detail.getByRole('button', { name: 'Send back', exact: true }).click();
		await expect
			.poll(() => detail.getByTestId('signoff-form').innerText())
			.toContain('needs attention');
		await expectAccessible(page, 'the sign-off form with its note refused');
		await detail.getByLabel('Note for the apprentice').fill('Read the secondary winding too');
		await detail.getByRole('button', { name: 'Send back', exact: true }).click();
		await expect.poll(() => stateOf(page, second)).toBe('sent_back');
		await page.setViewportSize({ width: 390, height: 844 });
		await page.reload();
		expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(
			390
		);
		await expectAccessible(page, 'the office job page at phone size');
		await page.locator(`#test-${second}`).scrollIntoViewIfNeeded();
		await shot(page, 'signoff-6-desk-sent-back-phone-size');
		await page.goto(`${base}/signoffs`);
		await page
			.getByTestId('sent-back')
			.getByTestId('due-test')
			.filter({ hasText: `Job ${jobNumber}` })
			.waitFor();
		await expectAccessible(page, 'Sign-offs at phone size');
		await shot(page, 'signoff-7-list-phone-size');
		await page.setViewportSize({ width: 1280, height: 800 });

		await syncNow(phone.page);
		await phone.page.goto(`${base}/field`);
		const card = phone.page
			.getByTestId('job-list')
			.getByRole('link', { name: new RegExp(`Job ${jobNumber}`) });
		await expect
			.poll(() => card.getByTestId('job-sent-back').innerText())
			.toContain('Read the secondary winding too');
		await shot(phone.page, 'signoff-8-apprentice-sent-back');
		await openJob(phone.page);
		expect(
			await phone.page.locator(`#test-${second}`).getByTestId('signoff-note').innerText()
		).toBe('To do again: Read the secondary winding too');
	});

	it('is signed off on the lead’s own phone offline, and reaches the desk at its next sync', async () => {
		const { page, context } = leadPhone;
		await syncNow(page);
		await openJob(page);
		const detail = page.locator(`#test-${second}`);
		await detail.getByTestId('witness').waitFor();
		await expectAccessible(page, 'the lead’s phone job page');
		await detail.getByTestId('witness').scrollIntoViewIfNeeded();
		await shot(page, 'signoff-9-lead-phone');
		await context.setOffline(true);
		await detail.getByRole('button', { name: 'Sign off — I watched it' }).click();
		await expect.poll(() => stateOf(page, second)).toBe('signed');
		await expect
			.poll(() => page.getByTestId('sync-badge').textContent())
			.toContain('1 waiting to send');
		await context.setOffline(false);
		await syncNow(page);
		await desk.page.goto(`${base}/jobs/${jobId}`);
		expect(await stateOf(desk.page, second)).toBe('signed');
		expect(
			await desk.page.locator(`#test-${second}`).getByTestId('signoff-detail').innerText()
		).toContain('watched at the car');
	});
});

describe('an apprentice’s circuit test at the car', () => {
	it('is signed off on the lead’s own phone offline, like a coil test, and the desk says it was watched', async () => {
		// The apprentice's relay test, as their phone sends it (invented figures: coil 120 Ω,
		// it clicks, 15 mV across the contacts; what it is judged against does not matter here).
		const circuit = uuidv7();
		const pushed = await phone.page.request.post(`${base}/api/sync/push`, {
			data: {
				deviceId: `e2e-apprentice-${circuit.slice(-6)}`,
				ops: [
					{
						opId: uuidv7(),
						entity: 'circuit_test',
						entityId: circuit,
						kind: 'create',
						baseVersion: 0,
						deviceTime: new Date().toISOString(),
						fields: { jobId, kind: 'relay', inputs: { ...defaultsFor('relay'), coilOhm: 120, clicks: 'yes', contactV: 0.015 } }
					}
				]
			}
		});
		expect(pushed.status()).toBe(200);
		expect((await pushed.json()).results[0].status).toBe('applied');

		const { page, context } = leadPhone;
		await syncNow(page);
		await openJob(page);
		const card = page.locator(`#circuit-${circuit}`);
		await expect.poll(() => card.getByTestId('signoff-state').getAttribute('data-signoff')).toBe('waiting');
		await card.getByTestId('witness').scrollIntoViewIfNeeded();
		await expectAccessible(page, 'the lead’s phone, an apprentice’s circuit test');
		await shot(page, 'signoff-10-lead-phone-circuit');
		await context.setOffline(true);
		await card.getByRole('button', { name: 'Sign off — I watched it' }).click();
		await expect.poll(() => card.getByTestId('signoff-state').getAttribute('data-signoff')).toBe('signed');
		expect(await card.getByTestId('witness').count()).toBe(0);
		await expect.poll(() => page.getByTestId('sync-badge').textContent()).toContain('1 waiting to send');
		await context.setOffline(false);
		await syncNow(page);

		await desk.page.goto(`${base}/jobs/${jobId}`);
		const onDesk = desk.page.locator(`#circuit-${circuit}`);
		expect(await onDesk.getByTestId('signoff-state').getAttribute('data-signoff')).toBe('signed');
		expect(await onDesk.getByTestId('signoff-detail').innerText()).toContain('watched at the car');
	});
});

describe('a re-test after the repair', () => {
	it('starts from the finished test with the same part', async () => {
		const { page } = phone;
		await openJob(page);
		await page.locator(`#test-${first}`).getByTestId('retest').click();
		await page.waitForURL(new RegExp(`/test/new\\?retest=${first}`));
		await page.getByTestId('retest-start').waitFor();
		expect(
			await page
				.getByTestId('parts')
				.getByRole('button', { name: /TB-IC-2041/ })
				.getAttribute('aria-pressed')
		).toBe('true');
		expect(
			await page.getByRole('button', { name: '1', exact: true }).getAttribute('aria-pressed')
		).toBe('true');
		expect(
			await page.getByRole('button', { name: '2', exact: true }).getAttribute('aria-pressed')
		).toBe('false');
		await expectAccessible(page, 'a re-test starting');
		await shot(page, 'signoff-10-retest');
	});
});
