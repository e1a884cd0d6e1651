import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { detectDelimiter, parseCsv, writeCsv } from '../../../src/lib/csv';

const cells = (text: string) => parseCsv(text).rows.map((r) => r.cells);

// Quoting rules: RFC 4180 §2 (fields with separators, quotes or line breaks are enclosed
// in double quotes; a quote inside is doubled).
describe('reading CSV (RFC 4180 §2)', () => {
	it('splits plain cells on commas and lines on CRLF, LF or CR', () => {
		expect(cells('a,b\r\nc,d\ne,f\rg,h')).toEqual([
			['a', 'b'],
			['c', 'd'],
			['e', 'f'],
			['g', 'h']
		]);
	});

	it('keeps separators, doubled quotes and line breaks inside a quoted cell', () => {
		expect(cells('"a,b","say ""OK""","two\r\nlines"\n')).toEqual([
			['a,b', 'say "OK"', 'two\r\nlines']
		]);
	});

	it('numbers each record by the line it starts on, counting line breaks inside quotes', () => {
		const { rows } = parseCsv('h1,h2\n"x\ny",1\nz,2\n');
		expect(rows.map((r) => r.line)).toEqual([1, 2, 4]);
	});

	it('skips empty lines and lines of empty cells, and keeps empty cells inside a row', () => {
		expect(cells('a,,c\n\n,,\nd,e,\n')).toEqual([
			['a', '', 'c'],
			['d', 'e', '']
		]);
	});

	it('ignores a leading byte-order mark', () => {
		expect(cells('\uFEFFrecord,part_number\n')).toEqual([['record', 'part_number']]);
	});

	it('reports an unclosed quote at the line and cell where it opened', () => {
		const { problems } = parseCsv('a,b\nc,"open\nmore');
		expect(problems).toEqual([{ line: 2, column: 2, message: 'Unclosed quote' }]);
	});

	it('reports text after a closing quote and a quote inside an unquoted cell', () => {
		expect(parseCsv('"a"b,c\n').problems[0]).toMatchObject({
			line: 1,
			column: 1,
			message: 'Text after a closing quote'
		});
		expect(parseCsv('a,b"c\n').problems[0]).toMatchObject({ line: 1, column: 2 });
	});

	it('reads semicolon files, where a decimal comma stays inside its cell', () => {
		const r = parseCsv('min;max\n0,38;0,58\n');
		expect(r.delimiter).toBe(';');
		expect(r.rows[1].cells).toEqual(['0,38', '0,58']);
	});
});

describe('telling the separator from the header line', () => {
	it.each([
		['record,part_number,kind', ','],
		['record;part_number;kind', ';'],
		['record\tpart_number\tkind', '\t'],
		['"a;b",c,d', ','],
		['"a,b";c;d', ';'],
		['single', ',']
	])('%j is separated by %j', (line, d) => {
		expect(detectDelimiter(line + '\n1;2,3')).toBe(d);
	});
});

describe('writing CSV', () => {
	it('quotes only the cells that need it and ends every line with CRLF', () => {
		expect(writeCsv([['a', 'b,c', 'say "hi"', ' pad', 'x\ny']])).toBe(
			'a,"b,c","say ""hi"""," pad","x\ny"\r\n'
		);
	});

	it('quotes a semicolon only in semicolon files', () => {
		expect(writeCsv([['0,5', 'a;b']], ';')).toBe('0,5;"a;b"\r\n');
	});

	it('reads back exactly what it wrote, for any text (property)', () => {
		const cell = fc.string({
			unit: fc.constantFrom('a', 'Ω', ',', ';', '"', '\n', '\r', ' ', '7')
		});
		const row = fc
			.array(cell, { minLength: 1, maxLength: 5 })
			.filter((r) => r.some((c) => c !== ''));
		fc.assert(
			fc.property(
				fc.array(row, { maxLength: 6 }),
				fc.constantFrom(',' as const, ';' as const),
				(rows, d) => {
					expect(parseCsv(writeCsv(rows, d), d).rows.map((r) => r.cells)).toEqual(rows);
				}
			)
		);
	});
});
