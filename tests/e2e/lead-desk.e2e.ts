/**
 * The lead's desk: two phones of the demo technician change the same job's status offline;
 * after both sync, the lead settles the clash in the inbox at a desk, and both phones show
 * the settled value after their next sync (and no longer list the clash). The lead's pages (inbox, overview, a job with a
 * test) and the phone's job page pass axe-core's WCAG 2.2 AA rules, at desk and phone size.
 */
import type { Page } from 'playwright-core';
import { v7 as uuidv7 } from 'uuid';
import { afterAll, afterEach, beforeAll, describe, expect, inject, it } from 'vitest';
import { DEMO_USERS } from '../../src/lib/server/seed/demo';
import { axeViolations } from './axe';
import { openAt, openPhone, shot, signInAs } from './browser';
import { openFieldJob, syncPhone } from './phone-steps';

const base = inject('baseURL');
const TECH = DEMO_USERS[2];
const COIL = '019a0000-0000-7000-8000-000000000401'; // the demo coil and its approved sheet
const SHEET = '019a0000-0000-7000-8000-000000000501';
let desk: Awaited<ReturnType<typeof openAt>>;
let one: Awaited<ReturnType<typeof openPhone>>;
let two: Awaited<ReturnType<typeof openPhone>>;
let jobId = '';
let jobNumber = 0;

beforeAll(async () => {
	[desk, one, two] = await Promise.all([openAt('desk'), openPhone(), openPhone()]);
	for (const b of [desk, one, two]) b.page.setDefaultTimeout(20_000);
	await signInAs(desk, base, 'lead@tallowbridge.example');
	const r = await desk.page.request.post(`${base}/api/jobs`, {
		data: { complaint: `Cuts out on the motorway ${Date.now().toString(36)}`, assigneeId: TECH.id }
	});
	expect(r.status()).toBe(201);
	({ id: jobId, number: jobNumber } = (await r.json()).job);
	await Promise.all([signInAs(one, base, TECH.email), signInAs(two, base, TECH.email)]);
});
afterEach(() => {
	for (const b of [desk, one, two]) expect(b.errors, 'uncaught errors in the page').toEqual([]);
});
afterAll(async () => {
	await Promise.all([desk?.close(), one?.close(), two?.close()]);
});

const syncNow = (page: Page) => syncPhone(page, base);
const openJob = (page: Page) => openFieldJob(page, base, jobId);
const expectAccessible = async (page: Page, where: string) =>
	expect(await axeViolations(page), where).toEqual([]);

describe('a clash settled at the desk', () => {
	it('is made by two phones changing the job’s status offline', async () => {
		for (const phone of [one, two]) {
			await syncNow(phone.page);
			await openJob(phone.page);
			await phone.context.setOffline(true);
		}
		await one.page.getByLabel('Status').selectOption('awaiting_parts');
		await two.page.getByLabel('Status').selectOption('no_fault_found');
		// The first phone gets signal (and sends) first, then the second.
		for (const phone of [one, two]) {
			await expect
				.poll(() => phone.page.getByTestId('sync-badge').textContent())
				.toContain('1 waiting to send');
			await phone.context.setOffline(false);
			await syncNow(phone.page);
		}
		// A sync already running in the background may have sent it: read the list afresh.
		await two.page.goto(`${base}/field/sync`);
		await expect
			.poll(() => two.page.getByTestId('issues').innerText())
			.toContain('two edits clash');
		await shot(two.page, 'lead-desk-1-phone-clash');
	});

	it('shows in the lead’s inbox in words, with the count in the navigation', async () => {
		const { page } = desk;
		await page.goto(`${base}/conflicts`);
		const card = page.getByTestId('clash').filter({ hasText: `Job ${jobNumber}` });
		await card.waitFor();
		expect(await card.getByTestId('stored-value').textContent()).toBe('Awaiting parts');
		expect(await card.getByTestId('phone-value').textContent()).toBe('No fault found');
		expect(await card.innerText()).toContain(`${TECH.name} · phone`);
		expect(
			Number(
				await page
					.getByTestId('clashes-count')
					.innerText()
					.then((t) => t.replace(/\D/g, ''))
			)
		).toBeGreaterThanOrEqual(1);
		await expectAccessible(page, 'the inbox at desk size');
		await shot(page, 'lead-desk-2-inbox');
	});

	it('is settled by picking the second phone’s value, with a note', async () => {
		const { page } = desk;
		const card = page.getByTestId('clash').filter({ hasText: `Job ${jobNumber}` });
		await card.getByLabel(/From .*No fault found/).check();
		await card.getByLabel(/^Note/).fill('Road-tested 20 km with the customer: no cut-out');
		await card.getByRole('button', { name: 'Settle this clash' }).click();
		await expect
			.poll(() => page.getByTestId('settled-message').innerText())
			.toContain('is now “No fault found”');
		expect(
			await page
				.getByTestId('clash')
				.filter({ hasText: `Job ${jobNumber}` })
				.count()
		).toBe(0);
		expect(await page.getByTestId('settled').innerText()).toContain(
			'Road-tested 20 km with the customer'
		);
		await shot(page, 'lead-desk-3-settled');
	});

	it('reaches both phones at their next sync', async () => {
		for (const phone of [one, two]) {
			await syncNow(phone.page);
			await openJob(phone.page);
			await expect.poll(() => phone.page.getByLabel('Status').inputValue()).toBe('no_fault_found');
		}
		// The second phone no longer lists the settled clash as needing attention.
		await expect.poll(() => two.page.getByTestId('sync-badge').textContent()).toContain('All sent');
		await shot(one.page, 'lead-desk-4-phone-settled');
	});
});

describe('the lead’s pages', () => {
	it('show a synced test on the office job page and the phone, accessible at both sizes', async () => {
		const t = uuidv7();
		const reading = (position: string, value: number) => ({
			opId: uuidv7(),
			entity: 'reading',
			entityId: uuidv7(),
			kind: 'create',
			baseVersion: 0,
			deviceTime: new Date().toISOString(),
			fields: {
				testId: t,
				checkKey: 'primary',
				position,
				samples: [{ value, unit: 'Ω' }],
				rangeLabel: '200 Ω',
				deviceResult: { value: value - 0.1, verdict: 'within' }
			}
		});
		const ops = [
			{
				opId: uuidv7(),
				entity: 'test',
				entityId: t,
				kind: 'create',
				baseVersion: 0,
				deviceTime: new Date().toISOString(),
				fields: {
					jobId,
					componentId: COIL,
					sheetId: SHEET,
					partNumber: 'TB-IC-2041',
					position: '1,2',
					meter: {
						name: 'Bench meter',
						ranges: [{ label: '200 Ω', resolution: 0.01, pctOfReading: 0.5, counts: 2 }],
						leadResistance: 0.1,
						relativeMode: false
					},
					temperature: { mode: 'measured', tempC: 18 }
				}
			},
			reading('1', 0.6),
			reading('2', 0.92) // 0.82 Ω, over the cold spec: the phone said OK, the workshop disagrees
		];
		const r = await one.page.request.post(`${base}/api/sync/push`, {
			data: { deviceId: uuidv7(), ops }
		});
		expect((await r.json()).results.map((x: { status: string }) => x.status)).toEqual([
			'applied',
			'applied',
			'applied'
		]);

		await desk.page.goto(`${base}/jobs/${jobId}`);
		const detail = desk.page.getByTestId('test-detail');
		await detail.waitFor();
		expect(await detail.locator('[data-differ=yes]').count()).toBe(1);
		await expectAccessible(desk.page, 'the office job page at desk size');
		await shot(desk.page, 'lead-desk-5-office-test');

		await syncNow(one.page);
		await openJob(one.page);
		await one.page.getByTestId('test-detail').waitFor();
		expect(await one.page.getByTestId('test-detail').innerText()).toContain('They differ');
		await expectAccessible(one.page, 'the phone job page');
		await shot(one.page, 'lead-desk-6-phone-test');
	});

	it('pass the accessibility rules for the overview and an empty inbox, at desk and phone size', async () => {
		await desk.page.goto(`${base}/overview?from=2020-01-01`);
		await desk.page.getByTestId('parts-table').waitFor();
		expect(await desk.page.getByTestId('parts-table').textContent()).toContain('TB-IC-2041');
		await expectAccessible(desk.page, 'the overview at desk size');
		await shot(desk.page, 'lead-desk-7-overview');
		await desk.page.setViewportSize({ width: 390, height: 844 });
		await desk.page.reload();
		expect(
			await desk.page.evaluate(() => document.documentElement.scrollWidth)
		).toBeLessThanOrEqual(390);
		await expectAccessible(desk.page, 'the overview at phone size');
		await shot(desk.page, 'lead-desk-8-overview-phone');
		await desk.page.goto(`${base}/conflicts`);
		await expectAccessible(desk.page, 'the inbox at phone size');
		await desk.page.setViewportSize({ width: 1280, height: 900 });
	});
});
