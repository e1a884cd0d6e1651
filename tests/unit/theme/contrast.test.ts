/**
 * The outdoor theme's text and background pairs reach 7:1 — WCAG 2.1, Success Criterion
 * 1.4.6 Contrast (Enhanced), with relative luminance and contrast ratio as WCAG 2.1 defines
 * them (sRGB channel c ≤ 0.04045 ? c/12.92 : ((c+0.055)/1.055)^2.4; L = 0.2126 R + 0.7152 G
 * + 0.0722 B; ratio (L1 + 0.05) / (L2 + 0.05)).
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';

const css = readFileSync('src/app.css', 'utf8');
const color = (name: string) => {
	const m = css.match(new RegExp(`--color-${name}:\\s*(#[0-9a-f]{6})`, 'i'));
	if (!m) throw new Error(`no --color-${name} in app.css`);
	return m[1];
};
const channel = (c: number) => (c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4);
function luminance(hex: string) {
	const [r, g, b] = [1, 3, 5].map((i) => channel(parseInt(hex.slice(i, i + 2), 16) / 255));
	return 0.2126 * r + 0.7152 * g + 0.0722 * b;
}
export function contrast(a: string, b: string) {
	const [hi, lo] = [luminance(a), luminance(b)].sort((x, y) => y - x);
	return (hi + 0.05) / (lo + 0.05);
}

describe('contrast as WCAG 2.1 defines it', () => {
	it('gives 21:1 for black on white and 1:1 for a colour on itself (WCAG 2.1, definition of contrast ratio)', () => {
		expect(contrast('#000000', '#ffffff')).toBeCloseTo(21, 10);
		expect(contrast('#777777', '#777777')).toBe(1);
	});

	it('gives 4.48:1 for #777777 on white (a widely quoted worked value, from memory)', () => {
		expect(contrast('#777777', '#ffffff')).toBeCloseTo(4.48, 2);
	});
});

describe('the outdoor theme (WCAG 2.1 SC 1.4.6: at least 7:1)', () => {
	const pairs: [string, string][] = [
		['ink', 'paper'],
		['muted', 'paper'],
		['ok', 'paper'],
		['bad', 'paper'],
		['warn', 'paper'],
		['ink', 'panel'],
		['muted', 'panel'],
		['paper', 'ink'],
		['paper', 'ok'],
		['paper', 'bad'],
		['signal-ink', 'signal'],
		['signal', 'ink']
	];
	it.each(pairs)('puts %s text on %s at 7:1 or more', (fg, bg) => {
		expect(contrast(color(fg), color(bg))).toBeGreaterThanOrEqual(7);
	});
});
