import { describe, expect, it } from 'vitest';
import { buildReport, CLOSING_NOTE } from '../../../src/lib/report/words';
import { facts, PRIMARY, reading, SECONDARY } from './fixtures';

describe('the report in the customer’s words', () => {
	const doc = buildReport(facts());

	it('gives each tested cylinder one finding, its outcome the worst of its checks', () => {
		expect(doc.findings.map((f) => [f.title, f.outcomeText])).toEqual([
			['Ignition coil TB-IC-2041, cylinder 1', 'OK'],
			['Ignition coil TB-IC-2041, cylinder 2', 'OK'],
			['Ignition coil TB-IC-2041, cylinder 3', 'Out of spec']
		]);
		expect(doc.counts).toEqual({ ok: 2, out: 1, unclear: 0 });
	});

	it('says a reading 31 % over its limit in one plain sentence', () => {
		// 19.2 kΩ against a maximum of 14.6 kΩ: (19.2 − 14.6) / 14.6 = 31.5 % over.
		expect(doc.findings[2].sentence).toBe(
			'The coil on cylinder 3 measured well above its limit (secondary winding): it should be replaced.'
		);
	});

	it('shows each figure with its unit and the maker’s figure with its temperature, never a code', () => {
		expect(doc.findings[2].figures).toEqual([
			{ label: 'Primary winding', value: '0.51 Ω', spec: '0.38 to 0.58 Ω (engine cold, below 50 °C)', result: 'OK' },
			{ label: 'Secondary winding', value: '19.2 kΩ', spec: '8.8 to 14.6 kΩ (engine cold, below 50 °C)', result: 'over spec' }
		]);
		const text = JSON.stringify(doc);
		for (const code of ['"within"', '"high"', 'secondary"', 'ignition_coil', 'borderline']) expect(text).not.toContain(code);
	});

	it('calls an over-range reading an open circuit', () => {
		const f = facts();
		f.tests[0].readings[5] = reading(SECONDARY, '3', 'OL', 'kΩ');
		const found = buildReport(f).findings[2];
		expect(found.sentence).toContain('reads as an open circuit');
		expect(found.figures[1]).toMatchObject({ value: 'open circuit', result: 'open' });
	});

	it('says a reading within the meter’s ± of a limit cannot be told', () => {
		// 0.585 Ω ± (0.8 % + 3 × 0.01 Ω) straddles the 0.58 Ω maximum: borderline (DESIGN §4, judge).
		const f = facts();
		f.tests[0].readings[0] = reading(PRIMARY, '1', 0.585, 'Ω');
		const found = buildReport(f).findings[0];
		expect(found.outcomeText).toBe('Can’t tell');
		expect(found.sentence).toContain('too close to its limit to be sure');
	});

	it('tells what was tested: the part, the cylinders, the checks and the temperature', () => {
		expect(doc.tested[0]).toEqual({
			heading: 'Ignition coil TB-IC-2041',
			lines: [
				'Cylinders 1, 2 and 3',
				'Checked: primary winding (resistance, in Ω) and secondary winding (resistance, in kΩ)',
				'Temperature: measured 20 °C'
			]
		});
	});

	it('names the coils of a pack by the cylinders they serve', () => {
		const f = facts();
		f.tests[0].kind = 'coil_pack';
		f.tests[0].positions = [{ position: 'A', cylinders: [1, 4] }];
		f.tests[0].readings = [reading(PRIMARY, 'A', 0.2, 'Ω')];
		const found = buildReport(f).findings[0];
		expect(found.title).toBe('Coil pack TB-IC-2041, cylinders 1 and 4');
		expect(found.sentence).toBe('The coil serving cylinders 1 and 4 measured well below its limit: it should be replaced.');
	});

	it('words spark and swap tests without their codes', () => {
		const d = buildReport(
			facts({
				sparks: [{ position: '3', gapMm: 7, outcome: 'weak' }],
				swaps: [{ fromPosition: '3', toPosition: '2', conclusion: 'fault_followed' }]
			})
		);
		expect(d.findings.slice(3).map((x) => x.sentence)).toEqual([
			'The coil on cylinder 3 gave only a weak spark across a 7 mm tester gap: it cannot fire the plug reliably and should be replaced.',
			'We moved the coil from cylinder 3 to cylinder 2 and the misfire moved with it: the coil is at fault.'
		]);
	});

	it('carries the workshop, the technician, the date and the closing note', () => {
		expect(doc.workshop).toEqual({
			name: 'Harrow Lane Auto Electrics',
			lines: ['3 Harrow Lane, Millbrook', 'Phone 0100 555 0199', 'E-mail desk@harrowlane.example']
		});
		expect(doc.technicians).toBe('Sanna Velloway');
		expect(doc.dateText).toBe('2 December 2026');
		expect(doc.closing).toBe(CLOSING_NOTE);
		expect(CLOSING_NOTE).toMatch(/vehicle maker’s procedure and on local regulations/);
	});

	it('keeps photos an optional list and draws none when there are none', () => {
		expect(doc.photos).toEqual([]);
	});

	it('keeps only recommendations with words, each with its grade in words', () => {
		const d = buildReport(
			facts({ recommendations: [{ grade: 'urgent', text: 'Replace the coil on cylinder 3.' }, { grade: 'monitor', text: '  ' }] })
		);
		expect(d.recommendations).toEqual([{ grade: 'urgent', gradeText: 'Needs doing now', text: 'Replace the coil on cylinder 3.' }]);
	});
});
