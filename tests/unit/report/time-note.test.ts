/** The report says whose clock its dates follow, on the page and in the PDF. */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { renderReportPdf } from '../../../src/lib/server/reports/pdf';
import { buildReport } from '../../../src/lib/report/words';
import { facts } from './fixtures';

describe("the report's time note", { timeout: 30_000 }, () => {
	it("names the workshop's zone", () => {
		expect(buildReport(facts({ timeZone: 'Europe/London' })).timeNote).toBe(
			'Dates and times in this report are the workshop’s local time (Europe/London).'
		);
		expect(buildReport(facts({ timeZone: 'America/Argentina/Buenos_Aires' })).timeNote).toContain(
			'(America/Argentina/Buenos Aires)'
		);
	});

	it('says UTC for a workshop on UTC or with no zone recorded', () => {
		expect(buildReport(facts({ timeZone: 'UTC' })).timeNote).toBe(
			'Dates and times in this report are in UTC.'
		);
		expect(buildReport(facts()).timeNote).toBe('Dates and times in this report are in UTC.');
	});

	it('is printed in the PDF, as the text poppler extracts from it shows', async () => {
		const pdf = await renderReportPdf(buildReport(facts({ timeZone: 'Europe/London' })), {
			paper: 'a4'
		});
		const file = path.join(mkdtempSync(path.join(tmpdir(), 'fb-tz-')), 'r.pdf');
		writeFileSync(file, pdf);
		const text = execFileSync('pdftotext', ['-layout', file, '-'], { encoding: 'utf8' }).replace(
			/\s+/g,
			' '
		);
		expect(text).toContain(
			'Dates and times in this report are the workshop’s local time (Europe/London).'
		);
	});
});
