/**
 * Draws Fieldbench's icon and renders every size the browser and the installed app use, with
 * Debian's Chromium: `npx tsx scripts/make-icons.ts`. The files are committed; run this again
 * only when the icon changes, and look at docs/icons.png (the tab, the splash, every size).
 *
 * The mark is the product's own reading gauge: a pointer over the middle of three cells, the
 * reading inside its spec band. Ink and paper only, read from src/app.css (yellow is kept for
 * cautions).
 */
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { chromium } from 'playwright-core';
import { readPalette } from './lib/palette.js';

const { ink, paper } = readPalette();

/** The mark on a 64-unit grid, centred on (32, 31). */
const MOTIF = [
	`<rect x="6.5" y="33" width="13" height="15" rx="3.5" fill="none" stroke="${paper}" stroke-width="4"/>`,
	`<rect x="25" y="31" width="14" height="19" rx="4" fill="${paper}"/>`,
	`<rect x="44.5" y="33" width="13" height="15" rx="3.5" fill="none" stroke="${paper}" stroke-width="4"/>`,
	`<path d="M23 12.5H41L32 25Z" fill="${paper}" stroke="${paper}" stroke-width="3" stroke-linejoin="round"/>`
].join('');

/**
 * `tile`: a rounded ink square with transparent corners (favicon, "any" icons).
 * `bleed`: ink to the edges, the mark scaled into the middle so it stays inside the maskable
 * safe zone (a centred circle of 40 % of the size in radius) and clear of iOS's corner rounding.
 */
function iconSvg(shape: 'tile' | 'bleed', size?: number): string {
	const wh = size ? ` width="${size}" height="${size}"` : '';
	const body =
		shape === 'tile'
			? `<rect width="64" height="64" rx="12" fill="${ink}"/>${MOTIF}`
			: `<rect width="64" height="64" fill="${ink}"/><g transform="translate(32 32) scale(0.72) translate(-32 -31)">${MOTIF}</g>`;
	return `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 64 64"${wh}>${body}</svg>`;
}

const FILES = [
	['icons/favicon-32.png', 32, 'tile'],
	['icons/icon-192.png', 192, 'tile'],
	['icons/icon-512.png', 512, 'tile'],
	['icons/maskable-192.png', 192, 'bleed'],
	['icons/maskable-512.png', 512, 'bleed'],
	['icons/apple-touch-icon.png', 180, 'bleed']
] as const;

async function main() {
	writeFileSync('static/favicon.svg', iconSvg('tile') + '\n');
	console.log('static/favicon.svg');
	const browser = await chromium.launch({
		executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
		args: [
			'--no-sandbox',
			'--disable-gpu',
			'--disable-background-networking',
			'--disable-component-update',
			'--disable-sync',
			'--no-first-run'
		]
	});
	const page = await browser.newPage();
	for (const [name, size, shape] of FILES) {
		await page.setViewportSize({ width: size, height: size });
		await page.setContent(
			`<html><body style="margin:0;background:transparent">${iconSvg(shape, size)}</body></html>`
		);
		writeFileSync(`static/${name}`, await page.screenshot({ omitBackground: true }));
		console.log(`static/${name}`);
	}
	await page.setViewportSize({ width: 1180, height: 900 });
	await page.setContent(previewSheet(), { waitUntil: 'load' });
	mkdirSync('docs', { recursive: true });
	await page.screenshot({ path: 'docs/icons.png', fullPage: true });
	console.log('docs/icons.png');
	await browser.close();
}

/** One page to look at: a browser tab at 1× and 2×, the installed app's splash, every size. */
function previewSheet(): string {
	const img = (src: string, px: number, style = '') => {
		const type = src.endsWith('.svg') ? 'image/svg+xml' : 'image/png';
		const data = readFileSync(`static/${src}`).toString('base64');
		return `<img src="data:${type};base64,${data}" width="${px}" height="${px}" style="${style}" alt="">`;
	};
	const tab = (scale: number) => `
		<div style="zoom:${scale};display:inline-flex;align-items:end;background:#d7dbd9;padding:6px 6px 0;border-radius:6px 6px 0 0">
			<div style="display:flex;gap:6px;align-items:center;background:${paper};padding:6px 10px;border-radius:6px 6px 0 0;font:12px system-ui;color:${ink}">
				${img('favicon.svg', 16)}<span>Jobs · Fieldbench</span><span style="opacity:.6">✕</span>
			</div>
			<div style="display:flex;gap:6px;align-items:center;padding:6px 10px;font:12px system-ui;color:#333">
				<span style="width:16px;height:16px;border-radius:50%;background:#9aa"></span><span>Other tab</span>
			</div>
		</div>`;
	const splash = `
		<div style="width:195px;height:422px;border:2px solid #999;border-radius:18px;background:${paper};display:flex;flex-direction:column;align-items:center;justify-content:center;gap:18px">
			<div style="width:96px;height:96px;border-radius:50%;overflow:hidden">${img('icons/maskable-192.png', 96)}</div>
			<span style="font:700 20px 'Roboto Condensed',system-ui;color:${ink}">Fieldbench</span>
		</div>`;
	const safe = `
		<div style="position:relative;width:192px;height:192px">${img('icons/maskable-512.png', 192)}
			<div style="position:absolute;inset:19.2px;border:2px dashed ${paper};border-radius:50%"></div>
		</div>`;
	const label = (t: string) => `<div style="font:14px system-ui;color:${ink};margin:6px 0 18px">${t}</div>`;
	return `<html><body style="margin:0;padding:24px;background:${paper};font-family:system-ui">
		<div style="display:flex;gap:40px;align-items:start">
			<div>${tab(1)}${label('Browser tab, 1× (favicon.svg at 16 px)')}${tab(2)}${label('Browser tab, 2×')}
				<div style="display:flex;gap:24px;align-items:end">
					<div>${img('icons/icon-512.png', 192)}${label('icon-512 (any)')}</div>
					<div>${img('icons/icon-192.png', 96)}${label('icon-192')}</div>
					<div>${img('icons/apple-touch-icon.png', 90, 'border-radius:20px')}${label('Apple touch (180)')}</div>
					<div>${img('icons/favicon-32.png', 32)}${label('favicon-32')}</div>
				</div>
				<div style="display:flex;gap:24px;align-items:end">
					<div>${safe}${label('maskable-512, safe zone dashed')}</div>
					<div>${img('icons/maskable-512.png', 192, 'border-radius:50%')}${label('maskable in a circle')}</div>
					<div><div style="background:#222;padding:12px;width:64px">${img('icons/icon-192.png', 64)}</div>${label('on a dark home screen')}</div>
				</div>
			</div>
			<div>${splash}${label('Installed app splash: background, icon, name')}</div>
		</div></body></html>`;
}

await main();
