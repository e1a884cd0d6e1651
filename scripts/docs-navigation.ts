/**
 * Puts the navigation's screenshots side by side for the docs: `npx tsx scripts/docs-navigation.ts`
 * after `npx vitest run --project e2e tests/e2e/navigation.e2e.ts`, which signs in as the demo
 * lead and technician against the built app and saves screenshots/navigation-*.png. Writes
 * docs/navigation-phone.png (390×844) and docs/navigation-desk.png (1280×800).
 */
import { readFileSync } from 'node:fs';
import { chromium } from 'playwright-core';
import { readPalette } from './lib/palette.js';

const { ink, paper } = readPalette();
const image = (name: string) =>
	`data:image/png;base64,${readFileSync(`screenshots/${name}.png`).toString('base64')}`;

function sheet(shots: [string, string][], width: number, height: number) {
	const cells = shots
		.map(
			([name, caption]) => `<figure style="margin:0">
				<img src="${image(name)}" width="${width}" height="${height}" style="display:block;border:2px solid ${ink}">
				<figcaption style="font:700 18px system-ui;color:${ink};padding:8px 0">${caption}</figcaption>
			</figure>`
		)
		.join('');
	return `<html><body style="margin:0;padding:16px;background:${paper}">
		<div style="display:flex;flex-wrap:wrap;gap:24px">${cells}</div></body></html>`;
}

const browser = await chromium.launch({
	executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
	args: ['--no-sandbox', '--disable-gpu', '--no-first-run', '--disable-background-networking']
});
const page = await browser.newPage({ viewport: { width: 1300, height: 900 } });
await page.setContent(
	sheet(
		[
			['navigation-phone-lead', 'Workshop lead: the bottom bar'],
			['navigation-phone-lead-more', 'Workshop lead: More'],
			['navigation-phone-technician', 'Technician: the bottom bar']
		],
		390,
		844
	)
);
await page.screenshot({ path: 'docs/navigation-phone.png', fullPage: true });
await page.setViewportSize({ width: 1000, height: 900 });
await page.setContent(
	sheet(
		[
			['navigation-desk-lead', 'Workshop lead: the side bar (1280×800, shown at 75 %)'],
			['navigation-desk-technician', 'Technician: the side bar (1280×800, shown at 75 %)']
		],
		960,
		600
	)
);
await page.screenshot({ path: 'docs/navigation-desk.png', fullPage: true });
await browser.close();
console.log('docs/navigation-phone.png\ndocs/navigation-desk.png');
