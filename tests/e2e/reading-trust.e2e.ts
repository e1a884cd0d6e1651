/**
 * A result the technician can trust, at 390 × 844: a reading below the leads is "can't tell —
 * re-zero the leads" and cannot be saved; OL on a range below the meter's highest is "over
 * range", not an open circuit; the check, its spec, the reading, its result and the keypad
 * fit on one screen once the caution is acknowledged. Demo coil (invented figures): primary
 * cold spec 0.38–0.58 Ω; the example meter's 20 Ω range reads to 19.99 Ω and is not its
 * highest.
 */
import { describe, expect, inject, it } from 'vitest';
import { PHONE, phoneForFile, shot, signInAs } from './browser';
import { typeOnKeypad } from './phone-steps';

const base = inject('baseURL');
const JOB = '019a0000-0000-7000-8000-000000000301';

const phone = phoneForFile();

const type = (text: string) => typeOnKeypad(phone.page, text);

/** Elements of the capture screen that are not wholly inside the 390 × 844 viewport. */
async function offScreen(selectors: string[]) {
	return phone.page.evaluate(
		({ selectors, height }) =>
			selectors.filter((s) => {
				const e = document.querySelector(s);
				if (!e) return true;
				const r = e.getBoundingClientRect();
				return r.top < 0 || r.bottom > height || r.height === 0;
			}),
		{ selectors, height: PHONE.height }
	);
}

describe('a reading the technician can trust', () => {
	it('starts a coil test with the leads read for it', async () => {
		const { page } = phone;
		await signInAs(phone, base, 'tech@tallowbridge.example');
		await page.getByTestId('job-list').getByText('Job 1001').waitFor(); // synced to the phone
		await page.goto(`${base}/field/job/${JOB}/test/new`);
		await page.getByLabel('Part number as read off the part').fill('TB-IC-2041');
		await page.getByTestId('parts').getByRole('button', { name: /TB-IC-2041/ }).click();
		await page.getByLabel('Lead resistance in ohms').fill('0,20');
		await page.getByRole('button', { name: 'Stood overnight' }).click();
		await page.getByRole('button', { name: 'Start the test' }).click();
		await page.waitForURL(/\/test\/[0-9a-f-]{36}$/);
		await page.getByTestId('leads').getByText('read just now').waitFor();
	});

	it('says “can’t tell — re-zero the leads” for 0.15 Ω with 0.20 Ω leads, with Save disabled, all on one screen', async () => {
		const { page } = phone;
		await page.getByRole('button', { name: 'Got it' }).click(); // the caution folds to one line
		await page.getByTestId('cautions-folded').waitFor();
		await type('0,15');
		const result = page.getByTestId('result');
		await expect.poll(() => result.getAttribute('data-result')).toBe('bad_zero');
		expect(await result.textContent()).toContain('Can’t tell — re-zero the leads');
		expect(await page.getByRole('button', { name: 'Save ▸' }).isDisabled()).toBe(true);
		await page.evaluate(() => scrollTo(0, 0));
		expect(await offScreen(['#cell-h', '[data-testid=limits]', '[data-testid=entry]', '[data-testid=result]', '[data-testid=keypad]', '[data-testid=cautions-folded]'])).toEqual([]);
		await shot(page, 'trust-1-bad-zero');
	});

	it('reads OL on the 20 Ω range as “over range”, not as an open circuit', async () => {
		const { page } = phone;
		await page.getByRole('button', { name: 'Clear', exact: true }).click();
		await page.getByLabel('Range on your meter').selectOption('20 Ω (low-ohm)');
		await page.getByRole('button', { name: /^OL/ }).click();
		const result = page.getByTestId('result');
		await expect.poll(() => result.getAttribute('data-result')).toBe('over_range');
		expect(await result.textContent()).toContain('over range');
		expect(await page.getByRole('button', { name: 'Save ▸' }).isDisabled()).toBe(true);
		await page.evaluate(() => scrollTo(0, 0));
		expect(await offScreen(['#cell-h', '[data-testid=entry]', '[data-testid=result]', '[data-testid=keypad]'])).toEqual([]);
		await shot(page, 'trust-2-over-range');
	});

	it('saves once the leads are read again and the part read again', async () => {
		const { page } = phone;
		await page.getByTestId('leads').click();
		await page.getByLabel('Leads shorted, in ohms').fill('0,12');
		await page.getByRole('button', { name: 'Save leads' }).click();
		await expect.poll(() => page.getByTestId('leads').textContent()).toContain('0.12');
		expect(await page.getByTestId('entry').textContent()).toBe('0'); // read the part again
		await type('0,62'); // 0.62 − 0.12 = 0.50 Ω ± (0.0231 + 0.0206)
		await expect.poll(() => page.getByTestId('result').getAttribute('data-result')).toBe('within');
		expect(await page.getByRole('button', { name: 'Save ▸' }).isDisabled()).toBe(false);
	});
});
