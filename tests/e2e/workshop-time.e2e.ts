/**
 * The workshop time on the team page at phone size: a lead picks the zone, the office pages
 * follow it, a refused value says why; both states pass axe-core's WCAG 2.2 AA rules.
 * Zone abbreviations (CET/CEST for Europe/Berlin): IANA tzdb via Intl.
 */
import { afterAll, afterEach, beforeAll, describe, expect, inject, it } from 'vitest';
import { DEMO_WORKSHOP } from '../../src/lib/server/seed/demo';
import { axeViolations } from './axe';
import { openPhone, signInAs } from './browser';

const base = inject('baseURL');
const JOB_1001 = '019a0000-0000-7000-8000-000000000301';
let lead: Awaited<ReturnType<typeof openPhone>>;

beforeAll(async () => {
	lead = await openPhone();
	lead.page.setDefaultTimeout(20_000);
	await signInAs(lead, base, 'lead@tallowbridge.example');
});
afterEach(() => expect(lead.errors, 'uncaught errors in the page').toEqual([]));
afterAll(async () => {
	// Put the demo workshop back on its own zone for the other specs.
	await lead.page.goto(`${base}/team`);
	await lead.page.getByLabel('Time zone the workshop is in').selectOption(DEMO_WORKSHOP.timeZone);
	await lead.page.getByRole('button', { name: 'Save the workshop time' }).click();
	await lead.page.getByText(`Times now show in ${DEMO_WORKSHOP.timeZone}`).waitFor();
	await lead?.close();
});

describe('the workshop time on the team page', () => {
	it('is chosen from a list, and the office pages follow it', async () => {
		const { page } = lead;
		await page.goto(`${base}/team`);
		const zone = page.getByLabel('Time zone the workshop is in');
		expect(await zone.inputValue()).toBe(DEMO_WORKSHOP.timeZone);
		expect(await axeViolations(page), 'team page').toEqual([]);
		await zone.selectOption('Europe/Berlin');
		await page.getByRole('button', { name: 'Save the workshop time' }).click();
		await page.getByText('Times now show in Europe/Berlin').waitFor();
		expect(await page.getByTestId('workshop-now').innerText()).toMatch(/\d\d:\d\d CES?T/);
		await page.goto(`${base}/jobs/${JOB_1001}`);
		expect(await page.getByTestId('status-history').innerText()).toMatch(/\d\d:\d\d CES?T/);
	});

	it('refuses a zone that is not on the list, saying why, and stays accessible', async () => {
		const { page } = lead;
		await page.goto(`${base}/team`);
		await page.waitForLoadState('networkidle'); // hydrated: the form posts through its script
		// A value the list never offers, as a tampered or outdated form would send.
		await page.evaluate(() => {
			const s = document.querySelector<HTMLSelectElement>('#f-timeZone')!;
			s.add(new Option('Atlantis/Harbour', 'Atlantis/Harbour', true, true));
		});
		await page.getByRole('button', { name: 'Save the workshop time' }).click();
		await page.getByText('Choose a time zone from the list, like Europe/London').waitFor();
		expect(await page.getByLabel('Time zone the workshop is in').getAttribute('aria-invalid')).toBe(
			'true'
		);
		expect(await axeViolations(page), 'team page with the error').toEqual([]);
	});
});
