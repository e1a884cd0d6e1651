/**
 * The icon set is drawn in the palette's ink and paper (yellow is for cautions), in every size
 * the browser and the installed app ask for. PNG sizes are read from the IHDR chunk as the PNG
 * specification (W3C PNG, 2nd edition, §11.2.2) lays it out: width and height as 4-byte
 * big-endian integers at bytes 16 and 20.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { readPalette } from '../../../scripts/lib/palette.js';

const palette = readPalette();
const PNG_SIGNATURE = Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);

function pngSize(file: string) {
	const b = readFileSync(file);
	expect(b.subarray(0, 8).equals(PNG_SIGNATURE), `${file} is a PNG`).toBe(true);
	expect(b.subarray(12, 16).toString('ascii')).toBe('IHDR');
	return { width: b.readUInt32BE(16), height: b.readUInt32BE(20) };
}

describe('the icon set', () => {
	it.each([
		['static/icons/favicon-32.png', 32],
		['static/icons/icon-192.png', 192],
		['static/icons/icon-512.png', 512],
		['static/icons/maskable-192.png', 192],
		['static/icons/maskable-512.png', 512],
		['static/icons/apple-touch-icon.png', 180]
	])('has %s at %i × %i px', (file, size) => {
		expect(pngSize(file)).toEqual({ width: size, height: size });
	});

	it('draws the favicon in ink and paper only, never the caution yellow', () => {
		const svg = readFileSync('static/favicon.svg', 'utf8').toLowerCase();
		const colours = new Set(svg.match(/#[0-9a-f]{6}\b/g));
		expect([...colours].sort()).toEqual([palette.ink, palette.paper].sort());
		expect(svg).not.toContain(palette.signal);
	});

	it('gives the browser bar the palette’s ink, and links every icon the page needs', () => {
		const html = readFileSync('src/app.html', 'utf8');
		expect(html).toMatch(new RegExp(`<meta name="theme-color" content="${palette.ink}"`, 'i'));
		for (const href of ['/favicon.svg', '/icons/favicon-32.png', '/icons/apple-touch-icon.png'])
			expect(html).toContain(`href="${href}"`);
	});
});

describe('reading the palette', () => {
	it('reads the colour tokens of the @theme block and nothing outside it', () => {
		const css = `:root { --color-ink: #000000; }\n@theme {\n --color-ink: #0B1F2A;\n --color-paper: #fbfaf6; /* x */\n --spacing-tap: 3.5rem;\n}`;
		expect(readPalette(css)).toEqual({ ink: '#0b1f2a', paper: '#fbfaf6' });
	});

	it('refuses a theme without ink or paper', () => {
		expect(() => readPalette('@theme { --color-ink: #000000; }')).toThrow(/paper/);
	});
});
