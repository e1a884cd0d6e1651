/**
 * The spec library at phone size: the demo lead adds a coil pack, writes its spec sheet
 * (an inline error first), approves it, and the demo technician then finds it approved.
 * Other end-to-end files share this database, so the part number is unique per run and no
 * count is assumed. Figures are invented.
 */
import { describe, expect, inject, it } from 'vitest';
import { phoneForFile, shot, signInAs } from './browser';

const base = inject('baseURL');
const PART = `E2E-CP-${Date.now().toString(36).toUpperCase()}`;

const phone = phoneForFile();

const signIn = (email: string) => signInAs(phone, base, email);

/** Buttons and links on screen lower than 56 CSS px (DESIGN §7), and the page's width. */
async function layoutProblems() {
	return phone.page.evaluate(() => ({
		small: [...document.querySelectorAll('main a, main button, main select, main input')]
			.filter(
				(e) =>
					(e as HTMLInputElement).type !== 'checkbox' && (e as HTMLInputElement).type !== 'file'
			)
			.map((e) => ({ text: (e.textContent || e.id).trim(), h: e.getBoundingClientRect().height }))
			.filter((e) => e.h > 0 && e.h < 56),
		width: document.documentElement.scrollWidth
	}));
}

describe('the spec library at phone size', () => {
	it('lets the demo lead add a coil pack with its coils and cylinders', async () => {
		const { page } = phone;
		await signIn('lead@tallowbridge.example');
		await page.goto(`${base}/library`);
		await page
			.getByTestId('result-count')
			.filter({ hasText: /part/ })
			.waitFor();
		await page.getByTestId('library-cards').waitFor();
		expect(await page.getByTestId('library-cards').textContent()).toContain('TB-IC-2041');
		expect(await layoutProblems()).toEqual({ small: [], width: 390 });
		await shot(page, 'library-phone');

		await page.getByRole('link', { name: '+ New part' }).click();
		await page.getByLabel('Part number').fill(PART);
		await page.getByLabel('Kind').selectOption('coil_pack');
		await page.getByLabel('Description').fill('Two-coil pack for the end-to-end test (invented)');
		await page.getByRole('checkbox', { name: /High voltage/ }).check();
		await page.getByRole('button', { name: '+ Add a vehicle' }).click();
		await page.getByLabel('Make', { exact: true }).fill('Corvane');
		await page.getByLabel('Model', { exact: true }).fill('Pica Van');
		await page.getByLabel('From year', { exact: true }).fill('2016');
		await page.getByLabel('To year', { exact: true }).fill('2020');
		for (const [coil, cylinders] of [
			['A', '1 4'],
			['B', '2 3']
		]) {
			await page.getByRole('button', { name: '+ Add a coil' }).click();
			await page.getByLabel('Coil', { exact: true }).last().fill(coil);
			await page.getByLabel('Cylinders').last().fill(cylinders);
		}
		expect(await layoutProblems()).toEqual({ small: [], width: 390 });
		await page.getByRole('button', { name: 'Add to the library' }).click();
		await page.getByTestId('part-number').filter({ hasText: PART }).waitFor();
		const coils = await page.getByTestId('positions').textContent();
		expect(coils).toContain('Coil A → cylinders 1 and 4');
		expect(coils).toContain('Coil B → cylinders 2 and 3');
		expect(await page.getByTestId('fitment').textContent()).toContain('Corvane Pica Van');
		expect(await page.getByTestId('cautions').textContent()).toContain('High voltage');
		await shot(page, 'library-component-phone');
	});

	it('shows the lead an inline error from the shared rules, then saves and approves the sheet', async () => {
		const { page } = phone;
		await page.getByRole('link', { name: 'Write the first spec sheet' }).click();
		await page.getByTestId('check').waitFor();
		await page.getByLabel('What is checked').fill('Primary winding, coil A');
		await page.getByLabel('From terminal').fill('+');
		await page.getByLabel('To terminal').fill('A');
		await page.getByLabel('Meter range hint').fill('200 Ω');
		const [coldMin, hotMin] = [page.getByLabel('Min Ω').nth(0), page.getByLabel('Min Ω').nth(1)];
		const [coldMax, hotMax] = [page.getByLabel('Max Ω').nth(0), page.getByLabel('Max Ω').nth(1)];
		await coldMin.fill('0,5');
		await coldMax.fill('0,4'); // below the min: refused
		await hotMin.fill('0.6');
		await hotMax.fill('0.9');
		await page.getByRole('button', { name: 'Save draft' }).click();
		await page.getByText('Max is below min').waitFor();
		expect(await coldMax.getAttribute('aria-invalid')).toBe('true');
		await shot(page, 'library-sheet-error-phone');

		await coldMax.fill('0,8');
		expect(await page.getByText('Max is below min').count()).toBe(0);
		await page.getByLabel('Document').fill('Invented data sheet');
		await page.getByLabel('Page').fill('7');
		await page.getByRole('button', { name: 'Save draft' }).click();
		await page.waitForURL(/\/library\/[0-9a-f-]+\/sheets\/[0-9a-f-]+$/);
		await page.getByRole('button', { name: 'Approve version 1' }).click();
		await page.getByRole('button', { name: 'Yes, approve version 1' }).click();
		await page.getByTestId('sheet-view').waitFor();
		const view = await page.getByTestId('sheet-view').textContent();
		expect(view).toContain('Cold spec · below 50 °C');
		expect(view).toContain('0.5 Ω to 0.8 Ω');
		expect(view).toContain('0.6 Ω to 0.9 Ω');
		expect(await page.getByTestId('approved-by').textContent()).toContain('Desmond Arkwell');
		expect(await page.getByRole('button', { name: /Approve/ }).count()).toBe(0);
		expect(await layoutProblems()).toEqual({ small: [], width: 390 });
		await shot(page, 'library-sheet-approved-phone');
	});

	it('lets the demo technician find it in the library, approved, without an approve button', async () => {
		const { page } = phone;
		await signIn('tech@tallowbridge.example');
		await page.goto(`${base}/library`);
		await page.getByLabel('Search').fill(PART.toLowerCase());
		await page.waitForURL(new RegExp(`q=${PART.toLowerCase()}`));
		const card = page.getByTestId('library-cards').getByRole('link', { name: new RegExp(PART) });
		await card.waitFor();
		// Only the searched part is left once the filtered page has arrived.
		await expect.poll(() => page.getByTestId('library-cards').getByRole('link').count()).toBe(1);
		expect(await page.getByTestId('result-count').textContent()).toContain('1 part');
		expect(await card.textContent()).toContain('Approved v1');
		await shot(page, 'library-technician-phone');

		// The search is in the URL: a reload shows the same result.
		await page.reload();
		await card.waitFor();
		await card.click();
		await page.getByTestId('sheet-versions').waitFor();
		expect(await page.getByRole('button', { name: /Approve/ }).count()).toBe(0);
		await page.getByTestId('sheet-versions').getByRole('link').first().click();
		await page.getByTestId('sheet-view').waitFor();
		expect(await page.getByTestId('sheet-view').textContent()).toContain('0.5 Ω to 0.8 Ω');
	});

	it('finds the pack by vehicle and shows the table on a desktop', async () => {
		const { page } = phone;
		await page.setViewportSize({ width: 1280, height: 800 });
		try {
			await page.goto(`${base}/library?q=Corvane%20Pica%20Van&kind=coil_pack`);
			await page.getByTestId('library-table').getByRole('link', { name: PART }).waitFor();
			expect(await page.getByLabel('Kind').inputValue()).toBe('coil_pack');
			await shot(page, 'library-desktop');
		} finally {
			await page.setViewportSize({ width: 390, height: 844 });
		}
	});
});
