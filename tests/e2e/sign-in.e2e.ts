import { describe, expect, inject, it } from 'vitest';
import { DEMO_USERS } from '../../src/lib/server/seed/demo';
import { phoneForFile, shot, signInAs } from './browser';

const base = inject('baseURL');
const phone = phoneForFile();

const ROLE_WORDS = {
	owner: 'Owner',
	lead: 'Workshop lead',
	technician: 'Technician',
	apprentice: 'Apprentice'
};

const signIn = (email: string) => signInAs(phone, base, email);

describe('sign-in at phone size', () => {
	for (const u of DEMO_USERS) {
		it(`lets the demo ${u.role} sign in and see the first screen`, async () => {
			const { page } = phone;
			await signIn(u.email);
			await expect.poll(() => page.getByTestId('who').textContent()).toBe(u.name);
			expect(await page.getByTestId('role').textContent()).toBe(ROLE_WORDS[u.role]);
			await page.getByTestId('sync-badge').waitFor();
			await page.locator('[data-testid=job-list], p:has-text("No jobs assigned")').first().waitFor();
			// Other end-to-end files may add jobs; the seeded ones must be there.
			const text = await page.getByTestId('job-list').textContent();
			if (u.role === 'technician') expect(text).toContain('Job 1001');
			if (u.role === 'apprentice') expect(text).toContain('Job 1002');
			if (u.role === 'apprentice') expect(text).not.toContain('Job 1001');
			if (u.role === 'lead' || u.role === 'owner') expect(text).toMatch(/Job 1001[\s\S]*Job 1002|Job 1002[\s\S]*Job 1001/);
			const width = await page.evaluate(() => document.documentElement.scrollWidth);
			expect(width).toBeLessThanOrEqual(390);
			await shot(page, `home-${u.role}`);
		});
	}

	it('makes every button and link on the first screen at least 56 px tall', async () => {
		const { page } = phone;
		await signIn(DEMO_USERS[2].email);
		const small = await page.$$eval('a, button', (els) =>
			els
				.map((e) => ({ text: e.textContent?.trim(), h: e.getBoundingClientRect().height }))
				.filter((x) => x.h < 56)
		);
		expect(small).toEqual([]);
	});

	it('shows a plain message for a wrong password and keeps the e-mail typed', async () => {
		const { page, context } = phone;
		await context.clearCookies();
		await page.goto(`${base}/sign-in`);
		await page.getByLabel('E-mail').fill(DEMO_USERS[0].email);
		await page.getByLabel('Password').fill('wrong password');
		await page.getByRole('button', { name: 'Sign in' }).click();
		await expect.poll(() => page.getByRole('alert').textContent()).toContain('do not match');
		expect(await page.getByLabel('E-mail').inputValue()).toBe(DEMO_USERS[0].email);
		await shot(page, 'sign-in-wrong-password');
	});

	it('keeps the apprentice out of the lead page', async () => {
		const { page } = phone;
		await signIn(DEMO_USERS[3].email);
		const r = await page.goto(`${base}/team`);
		expect(r?.status()).toBe(403);
		expect(await page.getByTestId('error-status').textContent()).toContain('Not for your role');
	});

	it('shows the lead the workshop team', async () => {
		const { page } = phone;
		await signIn(DEMO_USERS[1].email);
		await page.goto(`${base}/team`);
		// Other end-to-end files add people of their own, so each demo user is looked for by name.
		const rows = await page.locator('[data-testid=team] tbody tr').allInnerTexts();
		for (const u of DEMO_USERS) expect(rows.filter((r) => r.includes(u.name)), u.name).toHaveLength(1);
		await shot(page, 'team-lead');
	});

	it('signs out and then sends the visitor to sign-in', async () => {
		const { page } = phone;
		await signIn(DEMO_USERS[2].email);
		await page.getByRole('link', { name: 'Sign out' }).click();
		await page.getByRole('button', { name: 'Sign out' }).click();
		await page.waitForURL(`${base}/sign-in`);
		await page.goto(`${base}/field`);
		expect(page.url()).toContain('/sign-in?next=');
	});
});
