/** Steps the end-to-end files share on a phone: sync from the Sync screen, open a job, type on the keypad. */
import type { Page } from 'playwright-core';
import { expect } from 'vitest';

/** "Sync now" on the Sync screen; done when nothing waits to send and the button is free again. */
export async function syncPhone(page: Page, base: string) {
	await page.goto(`${base}/field/sync`);
	const button = page.getByRole('button', { name: /Sync now|Syncing/ });
	await button.click();
	await expect
		.poll(() => page.getByTestId('sync-badge').textContent(), { timeout: 20_000 })
		.not.toContain('waiting to send');
	await expect.poll(() => button.isEnabled(), { timeout: 20_000 }).toBe(true);
}

/** The phone's page of job `jobId`, once its complaint shows. */
export async function openFieldJob(page: Page, base: string, jobId: string) {
	await page.goto(`${base}/field/job/${jobId}`);
	await page.getByTestId('complaint').waitFor();
}

/** Types `text` on the glove-sized keypad, key by key. */
export async function typeOnKeypad(page: Page, text: string) {
	for (const ch of text) {
		const name = ch === ',' || ch === '.' ? 'Decimal separator' : ch;
		await page.getByTestId('keypad').getByRole('button', { name, exact: true }).click();
	}
}
