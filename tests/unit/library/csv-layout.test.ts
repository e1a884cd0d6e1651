import { describe, expect, it } from 'vitest';
import {
	CSV_COLUMNS,
	readLibraryCsv,
	writeLibraryCsv,
	type LibraryEntry
} from '../../../src/lib/library/csv-layout';

// Invented part numbers and figures. Limits are stored in base units: 8.8 kΩ is 8800 Ω
// (SI prefix kilo = 10³, BIPM SI Brochure, 9th ed., Table 7).
const LIBRARY: LibraryEntry[] = [
	{
		component: {
			partNumber: 'ZX-CP-7710',
			kind: 'coil_pack',
			description: 'Four-tower pack, "waste spark"; two coils',
			cautions: ['high_voltage'],
			fitment: [
				{ make: 'Corvane', model: 'Pica', yearFrom: 2014, yearTo: 2018, engineCode: 'CV14N' },
				{ make: 'Corvane', model: 'Pica Van', yearFrom: 2016, yearTo: null, engineCode: null }
			],
			positions: [
				{ position: 'A', cylinders: [1, 4] },
				{ position: 'B', cylinders: [2, 3] }
			]
		},
		sheets: [
			{
				sheetVersion: 1,
				state: 'approved',
				source: { document: 'Invented data sheet', section: '3.2', page: '11' },
				checks: [
					{
						key: 'primary',
						label: 'Primary winding',
						quantity: 'resistance',
						from: '+',
						to: '-',
						condition: 'key_off',
						rangeHint: '200 Ω',
						unit: 'Ω',
						openOk: false,
						bands: [
							{ fromC: null, toC: 50, min: 0.38, max: 0.58 },
							{ fromC: 50, toC: 100, min: 0.47, max: 0.68 }
						]
					},
					{
						key: 'secondary',
						label: 'Secondary winding',
						quantity: 'resistance',
						from: 'HT1',
						to: 'HT4',
						condition: 'key_off',
						rangeHint: null,
						unit: 'kΩ',
						openOk: true,
						bands: [{ fromC: -20, toC: 50, min: 8800, max: 14600 }]
					}
				]
			},
			{
				sheetVersion: 2,
				state: 'draft',
				source: null,
				checks: [
					{
						key: 'look',
						label: 'Cracks, tracking, =burn marks',
						quantity: 'visual',
						from: null,
						to: null,
						condition: 'key_off',
						rangeHint: null,
						unit: null,
						openOk: false,
						bands: []
					}
				]
			}
		]
	}
];

const csvOf = (lines: string[]) => [CSV_COLUMNS.join(','), ...lines].join('\n');
/** A line with the given cells set by column name, the rest empty. */
function lineOf(cells: Record<string, string>, delimiter = ',') {
	return CSV_COLUMNS.map((c) => cells[c] ?? '').join(delimiter);
}

describe('the library CSV layout', () => {
	it('writes one header, then component, fits, coil, sheet, check and limits lines', () => {
		const text = writeLibraryCsv(LIBRARY);
		const lines = text
			.replace(/^\uFEFF/, '')
			.trimEnd()
			.split('\r\n');
		expect(lines[0]).toBe(CSV_COLUMNS.join(','));
		expect(lines.slice(1).map((l) => l.split(',')[0])).toEqual([
			'component',
			'fits',
			'fits',
			'coil',
			'coil',
			'sheet',
			'check',
			'limits',
			'limits',
			'check',
			'limits',
			'sheet',
			'check'
		]);
		expect(text).toContain('coil,ZX-CP-7710,,,,,,,,,A,1 4,');
		// 8800 Ω shown in the check's unit, kΩ.
		expect(text).toContain(',secondary,,,,,,,,,-20,50,8.8,14.6\r\n');
	});

	it('reads back exactly what it wrote (export → import is lossless)', () => {
		const { entries, issues } = readLibraryCsv(writeLibraryCsv(LIBRARY));
		expect(issues).toEqual([]);
		const again = writeLibraryCsv(
			entries.map((e) => ({ component: e.component, sheets: e.sheets }))
		);
		expect(again).toBe(writeLibraryCsv(LIBRARY));
		expect(entries[0].sheets[0].checks[1].bands[0]).toEqual({
			fromC: -20,
			toC: 50,
			min: 8800,
			max: 14600
		});
	});

	it('writes semicolons with decimal commas and reads them back the same', () => {
		const text = writeLibraryCsv(LIBRARY, ';');
		expect(text).toContain(';primary;;;;;;;;;;50;0,38;0,58\r\n');
		const { entries, issues } = readLibraryCsv(text);
		expect(issues).toEqual([]);
		expect(entries[0].sheets[0].checks[0].bands[0]).toEqual({
			fromC: null,
			toC: 50,
			min: 0.38,
			max: 0.58
		});
	});

	it('guards text a spreadsheet would run as a formula, and reads it back unchanged (OWASP “CSV Injection”)', () => {
		const text = writeLibraryCsv(LIBRARY);
		expect(text).toContain(",'+,'-,"); // terminals + and -
		expect(text).toContain('Cracks'); // inner = is harmless
		const { entries } = readLibraryCsv(text);
		expect(entries[0].sheets[0].checks[0]).toMatchObject({ from: '+', to: '-' });
	});

	it('turns kΩ figures into base units to 12 significant digits (8,8 kΩ → 8800 Ω, not 8800.000000000001)', () => {
		const text = csvOf([
			lineOf({ record: 'component', part_number: 'ZX-1', kind: 'ignition_coil' }),
			lineOf({ record: 'sheet', part_number: 'ZX-1', sheet_version: '1', state: 'draft' }),
			lineOf({
				record: 'check',
				part_number: 'ZX-1',
				sheet_version: '1',
				check_key: 's',
				check_label: 'Secondary',
				quantity: 'resistance',
				condition: 'key_off',
				unit: 'kohm'
			}),
			lineOf({
				record: 'limits',
				part_number: 'ZX-1',
				sheet_version: '1',
				check_key: 's',
				to_c: '50',
				min: '"8,8"',
				max: '14.6'
			})
		]);
		const { entries, issues } = readLibraryCsv(text);
		expect(issues).toEqual([]);
		expect(entries[0].sheets[0].checks[0]).toMatchObject({
			unit: 'kΩ',
			bands: [{ min: 8800, max: 14600 }]
		});
	});

	it('reports each bad cell by line and column (a year, a unit that does not fit, a number)', () => {
		const text = csvOf([
			lineOf({ record: 'component', part_number: 'ZX-1', kind: 'ignition_coil' }),
			lineOf({
				record: 'fits',
				part_number: 'ZX-1',
				make: 'Corvane',
				model: 'Brisel',
				year_from: '20x9'
			}),
			lineOf({ record: 'sheet', part_number: 'ZX-1', sheet_version: '1', state: 'draft' }),
			lineOf({
				record: 'check',
				part_number: 'ZX-1',
				sheet_version: '1',
				check_key: 'p',
				check_label: 'Primary',
				quantity: 'resistance',
				condition: 'key_off',
				unit: 'V'
			}),
			lineOf({
				record: 'limits',
				part_number: 'ZX-1',
				sheet_version: '1',
				check_key: 'p',
				to_c: '50',
				min: '0.4',
				max: 'lots'
			})
		]);
		const { issues } = readLibraryCsv(text);
		expect(issues.map((i) => [i.line, i.column])).toEqual([
			[3, 'year_from'],
			[5, 'unit'],
			[6, 'max']
		]);
	});

	it('maps a schema refusal back to its line and column (min above max, overlapping band, wrong unit)', () => {
		const text = csvOf([
			lineOf({ record: 'component', part_number: 'ZX-1', kind: 'ignition_coil' }),
			lineOf({ record: 'sheet', part_number: 'ZX-1', sheet_version: '1', state: 'draft' }),
			lineOf({
				record: 'check',
				part_number: 'ZX-1',
				sheet_version: '1',
				check_key: 'p',
				check_label: 'Primary',
				quantity: 'resistance',
				condition: 'key_off',
				unit: 'Ω'
			}),
			lineOf({
				record: 'limits',
				part_number: 'ZX-1',
				sheet_version: '1',
				check_key: 'p',
				to_c: '50',
				min: '0.6',
				max: '0.4'
			}),
			lineOf({
				record: 'limits',
				part_number: 'ZX-1',
				sheet_version: '1',
				check_key: 'p',
				from_c: '40',
				min: '0.5'
			}),
			lineOf({
				record: 'check',
				part_number: 'ZX-1',
				sheet_version: '1',
				check_key: 'v',
				check_label: 'Supply',
				quantity: 'voltage',
				condition: 'key_on',
				unit: 'Ω'
			}),
			lineOf({
				record: 'limits',
				part_number: 'ZX-1',
				sheet_version: '1',
				check_key: 'v',
				min: '11'
			})
		]);
		const { issues } = readLibraryCsv(text);
		expect(issues.map((i) => [i.line, i.column])).toEqual([
			[5, 'max'],
			[6, 'from_c'],
			[7, 'unit']
		]);
	});

	it('reports lines that name a missing component, sheet or check', () => {
		const text = csvOf([
			lineOf({ record: 'fits', part_number: 'NOPE-1', make: 'Corvane', model: 'Brisel' }),
			lineOf({ record: 'component', part_number: 'ZX-1', kind: 'relay' }),
			lineOf({
				record: 'check',
				part_number: 'ZX-1',
				sheet_version: '3',
				check_key: 'p',
				check_label: 'Coil',
				quantity: 'resistance',
				condition: 'key_off',
				unit: 'Ω'
			})
		]);
		const { issues } = readLibraryCsv(text);
		expect(issues.map((i) => [i.line, i.column])).toEqual([
			[2, 'part_number'],
			[4, 'sheet_version']
		]);
	});

	it('refuses unknown columns, unknown record types and cells a record does not use', () => {
		expect(readLibraryCsv('record,part_number,colour\n').issues).toEqual([
			{ line: 1, column: 'colour', message: 'Unknown column' }
		]);
		const text = csvOf([
			lineOf({ record: 'widget', part_number: 'ZX-1' }),
			lineOf({ record: 'component', part_number: 'ZX-1', kind: 'relay', make: 'Corvane' })
		]);
		expect(readLibraryCsv(text).issues.map((i) => [i.line, i.column])).toEqual([
			[2, 'record'],
			[3, 'make']
		]);
	});

	it('accepts columns in any order and rows that stop before the last empty cells', () => {
		const text = 'part_number;record;kind\nZX-9;component;glow_plug\n';
		const { entries, issues } = readLibraryCsv(text);
		expect(issues).toEqual([]);
		expect(entries[0].component).toMatchObject({ partNumber: 'ZX-9', kind: 'glow_plug' });
	});
});

describe('the CSV example in docs/csv-layout.md', () => {
	it('is a valid library file that exports back to itself', async () => {
		const { readFileSync } = await import('node:fs');
		const doc = readFileSync(new URL('../../../docs/csv-layout.md', import.meta.url), 'utf8');
		const block = doc.match(/```csv\n([\s\S]*?)```/)?.[1];
		expect(block, 'a ```csv block').toBeTruthy();
		const { entries, issues } = readLibraryCsv(block!);
		expect(issues).toEqual([]);
		expect(entries[0].component.positions).toEqual([
			{ position: 'A', cylinders: [1, 4] },
			{ position: 'B', cylinders: [2, 3] }
		]);
		const again = writeLibraryCsv(entries)
			.replace(/^\uFEFF/, '')
			.replaceAll('\r\n', '\n');
		expect(again).toBe(block);
	});
});
