import { execFileSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { fontRuns } from '../../../src/lib/server/reports/fonts';
import { renderReportPdf } from '../../../src/lib/server/reports/pdf';
import { buildReport } from '../../../src/lib/report/words';
import { facts } from './fixtures';

const dir = mkdtempSync(path.join(tmpdir(), 'fb-pdf-'));
/** Text of a PDF as poppler's pdftotext reads it (Debian's poppler-utils). */
function pdfText(pdf: Buffer, name = 'r.pdf'): string {
	const file = path.join(dir, name);
	writeFileSync(file, pdf);
	return execFileSync('pdftotext', ['-layout', file, '-'], { encoding: 'utf8' });
}
function pageSize(pdf: Buffer, name: string): string {
	const file = path.join(dir, name);
	writeFileSync(file, pdf);
	return /Page size:\s+([\d.]+ x [\d.]+)/.exec(execFileSync('pdfinfo', [file], { encoding: 'utf8' }))![1];
}

// Drawing a PDF and reading it back with poppler takes a second or two, more on a busy machine.
describe('the report’s PDF', { timeout: 30_000 }, () => {
	const doc = buildReport(facts({ workDone: 'Replaced the ignition coil on cylinder 3.' }));
	let a4: Buffer;
	let letter: Buffer;
	beforeAll(async () => {
		[a4, letter] = await Promise.all([renderReportPdf(doc, { paper: 'a4' }), renderReportPdf(doc, { paper: 'letter' })]);
	}, 60_000);

	it('sets Ω from the greek subset, the rest from latin', () => {
		expect(fontRuns('19.2 kΩ', 400)).toEqual([
			{ font: 'rc-latin-400', text: '19.2 k' },
			{ font: 'rc-greek-400', text: 'Ω' }
		]);
		expect(fontRuns('\u2126', 700)).toEqual([{ font: 'rc-greek-700', text: 'Ω' }]);
	});

	it('says what the page says, Ω included, as the text extracted from it shows', async () => {
		const text = pdfText(a4).replace(/\s+/g, ' ');
		expect(text).toContain('Vehicle report, job 1042');
		expect(text).toContain(doc.findings[2].sentence);
		expect(text).toContain('Secondary winding: 19.2 kΩ. Maker’s figure: 8.8 to 14.6 kΩ (engine cold, below 50 °C)');
		expect(text).toContain('Replaced the ignition coil on cylinder 3.');
		expect(text).toContain('Harrow Lane Auto Electrics');
		expect(text).toContain('vehicle maker’s procedure and on local regulations');
	});

	it('comes in A4 (595 × 842 pt) and US Letter (612 × 792 pt)', async () => {
		// ISO 216: A4 is 210 × 297 mm; US Letter is 8.5 × 11 in; 72 pt to the inch.
		expect(pageSize(a4, 'a4.pdf')).toMatch(/^595\.\d+ x 841\.\d+$/);
		expect(pageSize(letter, 'letter.pdf')).toBe('612 x 792');
	});

	it('draws a first page with ink on it, kept as a PNG to look at (pdftoppm)', async () => {
		const file = path.join(dir, 'look.pdf');
		writeFileSync(file, a4);
		// A greyscale PGM at 36 dpi: 298 × 421 px for A4 (210 × 297 mm).
		execFileSync('pdftoppm', ['-r', '36', '-gray', '-f', '1', '-l', '1', file, path.join(dir, 'look')]);
		const pgm = readFileSync(path.join(dir, 'look-1.pgm'));
		const [, w, h] = /^P5\s+(\d+)\s+(\d+)\s+255\s/.exec(pgm.subarray(0, 40).toString('latin1'))!.map(Number);
		expect([w, h]).toEqual([298, 421]);
		const pixels = pgm.subarray(pgm.length - w * h);
		const dark = pixels.filter((v) => v < 128).length / pixels.length;
		expect(dark).toBeGreaterThan(0.01); // text, rules and shapes
		expect(dark).toBeLessThan(0.25); // not a black page
		const out = path.resolve('test-results', 'report');
		mkdirSync(out, { recursive: true });
		execFileSync('pdftoppm', ['-r', '60', '-png', file, path.join(out, 'report-a4')]);
	});

	it('embeds the shipped font and no other', async () => {
		const file = path.join(dir, 'fonts.pdf');
		writeFileSync(file, a4);
		const fonts = execFileSync('pdffonts', [file], { encoding: 'utf8' }).split('\n').slice(2).filter(Boolean);
		expect(fonts.length).toBeGreaterThan(1);
		for (const f of fonts) expect(f).toMatch(/RobotoCondensed.* yes yes yes/);
	});
});
