/**
 * Renders Fieldbench's own icon (static/favicon.svg's motif) to the PNG sizes the web app
 * manifest needs, with Debian's Chromium: `npx tsx scripts/make-icons.ts`. The PNGs are
 * committed; run this again only when the icon changes.
 */
import { writeFileSync } from 'node:fs';
import { chromium } from 'playwright-core';

const motif = `<path d="M14 46V18h22v7H22v5h12v7H22v9z" fill="#f2b705"/><path d="M40 18h10l-6 13h7L37 50l4-15h-6z" fill="#fbfaf6"/>`;
/** Rounded tile for "any"; full-bleed with the motif inside the 80 % safe circle for "maskable". */
const svg = (maskable: boolean) =>
	maskable
		? `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 64 64"><rect width="64" height="64" fill="#0b1f2a"/><g transform="translate(9.6 9.6) scale(0.7)">${motif}</g></svg>`
		: `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 64 64"><rect width="64" height="64" rx="12" fill="#0b1f2a"/>${motif}</svg>`;

const browser = await chromium.launch({
	executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
	args: ['--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run']
});
const page = await browser.newPage();
for (const [name, size, maskable] of [
	['icon-192.png', 192, false],
	['icon-512.png', 512, false],
	['maskable-512.png', 512, true],
	['apple-touch-icon.png', 180, true]
] as const) {
	await page.setViewportSize({ width: size, height: size });
	await page.setContent(
		`<html><body style="margin:0;background:transparent">${svg(maskable).replace('<svg ', `<svg width="${size}" height="${size}" `)}</body></html>`
	);
	writeFileSync(`static/icons/${name}`, await page.screenshot({ omitBackground: true }));
	console.log(`static/icons/${name}`);
}
await browser.close();
