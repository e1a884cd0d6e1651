/**
 * The shipped Roboto Condensed for the PDF. @fontsource ships it as subsets (latin,
 * latin-ext, greek, …), each covering the code points listed in its `unicode.json`: Ω
 * (U+03A9) is only in the greek file, so text is split into runs, each set in the first
 * subset that holds its characters. A character in no subset is replaced by a plain
 * equivalent (the ohm sign U+2126 by Ω) or by "?", so nothing silently disappears.
 */
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import path from 'node:path';

export type Weight = 400 | 700;
const SUBSETS = ['latin', 'latin-ext', 'greek'] as const;
type Subset = (typeof SUBSETS)[number];

const require = createRequire(import.meta.url);
const DIR = path.dirname(require.resolve('@fontsource/roboto-condensed/unicode.json'));

/** [from, to] code point ranges per subset, read from the package's own unicode.json. */
const RANGES: Record<Subset, [number, number][]> = (() => {
	const table = JSON.parse(readFileSync(path.join(DIR, 'unicode.json'), 'utf8')) as Record<string, string>;
	const parse = (s: string) =>
		s.split(',').map((r) => {
			const [a, b] = r.trim().replace(/^U\+/i, '').split('-');
			return [parseInt(a, 16), parseInt(b ?? a, 16)] as [number, number];
		});
	return Object.fromEntries(SUBSETS.map((s) => [s, parse(table[s])])) as Record<Subset, [number, number][]>;
})();

const REPLACE: Record<string, string> = { '\u2126': 'Ω', '→': 'to', '≈': 'about ', '≤': 'at most ', '≥': 'at least ' };

/** The pdfkit font name of a subset at a weight. */
export const fontName = (subset: Subset, weight: Weight) => `rc-${subset}-${weight}`;

/** The .woff file of a subset at a weight. */
export const fontFile = (subset: Subset, weight: Weight) =>
	path.join(DIR, 'files', `roboto-condensed-${subset}-${weight}-normal.woff`);

/** Register every subset at both weights on a pdfkit document. */
export function registerFonts(doc: { registerFont: (name: string, src: string) => unknown }): void {
	for (const s of SUBSETS) for (const w of [400, 700] as const) doc.registerFont(fontName(s, w), fontFile(s, w));
}

function subsetOf(cp: number): Subset | null {
	for (const s of SUBSETS) if (RANGES[s].some(([a, b]) => cp >= a && cp <= b)) return s;
	return null;
}

/** Split text into runs of one subset each (characters in none replaced, see above). */
export function fontRuns(text: string, weight: Weight): { font: string; text: string }[] {
	const runs: { font: string; text: string }[] = [];
	for (const ch of text) {
		let c = ch;
		let s = subsetOf(c.codePointAt(0)!);
		if (!s) {
			c = REPLACE[ch] ?? '?';
			s = subsetOf(c.codePointAt(0)!) ?? 'latin';
		}
		const font = fontName(s, weight);
		const last = runs.at(-1);
		if (last && last.font === font) last.text += c;
		else runs.push({ font, text: c });
	}
	return runs;
}
