import { afterAll, afterEach, beforeAll, describe, expect, inject, it } from 'vitest';
import { openPhone, shot } from './browser';

const base = inject('baseURL');
let phone: Awaited<ReturnType<typeof openPhone>>;
beforeAll(async () => {
	phone = await openPhone();
});
afterEach(() => {
	expect(phone.errors, 'uncaught errors in the page').toEqual([]);
});
afterAll(async () => {
	await phone?.close();
});

describe('the served app at phone size', () => {
	it('shows the product name, what it is for and that the database is up', async () => {
		const { page } = phone;
		await page.goto(base);
		await expect.poll(() => page.locator('h1').textContent()).toBe('Fieldbench');
		expect(await page.getByTestId('db-status').textContent()).toContain('Database: up');
		const width = await page.evaluate(() => document.documentElement.scrollWidth);
		expect(width).toBeLessThanOrEqual(390);
		const font = await page.evaluate(() => getComputedStyle(document.body).fontFamily);
		expect(font).toContain('Roboto Condensed');
		await shot(page, 'start-phone');
	});

	it('answers the health check with the database and migrations', async () => {
		const r = await fetch(`${base}/api/health`);
		expect(r.status).toBe(200);
		const body = await r.json();
		expect(body).toMatchObject({ ok: true, db: 'up', migrations: { pending: [] } });
		expect(body.migrations.applied).toBeGreaterThanOrEqual(2);
	});
});
