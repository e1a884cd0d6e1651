import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import {
	formatQuantity,
	normalizeUnit,
	parseDecimal,
	pickDisplayUnit,
	toBase,
	type Quantity
} from '$lib/domain/units';

/** |actual − expected| ≤ rel · |expected|: unit factors are powers of ten, not exact in binary. */
function expectRelativelyClose(actual: number, expected: number, rel = 1e-12) {
	expect(Math.abs(actual - expected)).toBeLessThanOrEqual(rel * Math.abs(expected));
}

describe('parseDecimal', () => {
	it.each([
		['0.4', 0.4],
		['0,4', 0.4],
		['.4', 0.4],
		[',4', 0.4],
		['  12.28  ', 12.28],
		['\t0,36\n', 0.36],
		['4.', 4],
		['0', 0],
		['007', 7],
		['-40', -40],
		['+5', 5],
		['\u22125,5', -5.5]
	])('reads %j as %d', (text, expected) => {
		expect(parseDecimal(text)).toBe(expected);
	});

	it.each([
		[''],
		['   '],
		['1.2.3'],
		['1,2,3'],
		['1.2,3'],
		['twelve'],
		['abc'],
		['NaN'],
		['Infinity'],
		['-Infinity'],
		['1e3'],
		['0x10'],
		['12 kΩ'],
		['1 2'],
		['.'],
		[','],
		['-'],
		['--1']
	])('rejects %j', (text) => {
		expect(parseDecimal(text)).toBeNull();
	});
});

describe('toBase', () => {
	it.each([
		[1, 'mΩ', 0.001],
		[0.4, 'Ω', 0.4],
		[12.28, 'kΩ', 12280],
		[2, 'MΩ', 2e6],
		[450, 'mV', 0.45],
		[12.6, 'V', 12.6],
		[25, 'kV', 25000],
		[150, 'mA', 0.15],
		[3, 'A', 3],
		[0.8, 'mm', 0.0008],
		[75, '°C', 75]
	])('converts %d %s to %d in the base unit', (value, unit, expected) => {
		expectRelativelyClose(toBase(value, unit), expected);
	});

	it.each([
		['\u2126', 0.4],
		['k\u2126', 400],
		['ohm', 0.4],
		['ohms', 0.4],
		['Ohm', 0.4],
		['kohm', 400],
		['Mohm', 400000],
		['mohm', 0.0004]
	])('accepts the ohm spelled %j', (unit, expected) => {
		expectRelativelyClose(toBase(0.4, unit), expected);
	});

	it('accepts a unit with surrounding spaces', () => {
		expect(toBase(5, ' kV ')).toBe(5000);
	});

	it.each([['xΩ'], ['kv'], ['KV'], [''], ['µA'], ['toString'], ['psi']])(
		'throws a RangeError for the unknown unit %j',
		(unit) => {
			expect(() => toBase(1, unit)).toThrow(RangeError);
		}
	);

	it('keeps an over-range reading infinite', () => {
		expect(toBase(Infinity, 'kΩ')).toBe(Infinity);
	});
});

describe('normalizeUnit', () => {
	it('turns the ohm sign U+2126 into the Greek capital omega U+03A9', () => {
		expect(normalizeUnit('M\u2126')).toBe('M\u03A9');
	});

	it('returns null for an unknown unit instead of throwing', () => {
		expect(normalizeUnit('furlong')).toBeNull();
	});
});

describe('pickDisplayUnit', () => {
	it.each([
		[0.4, 'resistance', 'Ω'],
		[0.1, 'resistance', 'Ω'],
		[0.099, 'resistance', 'mΩ'],
		[999, 'resistance', 'Ω'],
		[1000, 'resistance', 'kΩ'],
		[2e6, 'resistance', 'MΩ'],
		[5e12, 'resistance', 'MΩ'],
		[1e-9, 'resistance', 'mΩ'],
		[0, 'resistance', 'Ω'],
		[-0.035, 'current', 'mA'],
		[0.0008, 'length', 'mm']
	] as const)('shows %d as %s for %s', (value, quantity, unit) => {
		expect(pickDisplayUnit(value, quantity)).toBe(unit);
	});
});

describe('formatQuantity', () => {
	it.each([
		[0.4, 'resistance', '0.4 Ω'],
		[0.36, 'resistance', '0.36 Ω'],
		[12280, 'resistance', '12.3 kΩ'],
		[15400, 'resistance', '15.4 kΩ'],
		[0.05, 'resistance', '50 mΩ'],
		[0.0123, 'resistance', '12.3 mΩ'],
		[999.6, 'resistance', '1 kΩ'],
		[2.5e6, 'resistance', '2.5 MΩ'],
		[5e9, 'resistance', '5000 MΩ'],
		[0, 'resistance', '0 Ω'],
		[-0, 'resistance', '0 Ω'],
		[12.6, 'voltage', '12.6 V'],
		[-12.6, 'voltage', '-12.6 V'],
		[25000, 'voltage', '25 kV'],
		[0.45, 'voltage', '0.45 V'],
		[0.035, 'current', '35 mA'],
		[0.0008, 'length', '0.8 mm'],
		[75.44, 'temperature', '75.4 °C'],
		[-40, 'temperature', '-40 °C']
	] as const)('shows %d (%s) as %j in en-US', (value, quantity, expected) => {
		expect(formatQuantity(value, quantity, { locale: 'en-US' })).toBe(expected);
	});

	it.each([
		['de-DE', 0.4, '0,4 Ω'],
		['de-DE', 12280, '12,3 kΩ'],
		['fr-FR', 0.36, '0,36 Ω'],
		['en-GB', 0.36, '0.36 Ω']
	])('uses the decimal separator of %s', (locale, value, expected) => {
		expect(formatQuantity(value, 'resistance', { locale })).toBe(expected);
	});

	it('shows Latin digits even for a locale that has its own', () => {
		expect(formatQuantity(12, 'voltage', { locale: 'ar-EG' })).toMatch(/^12 V$/);
	});

	it('shows the number of significant digits asked for', () => {
		expect(formatQuantity(12346, 'resistance', { locale: 'en-US', digits: 4 })).toBe('12.35 kΩ');
	});

	it.each([
		[Infinity, 'OL'],
		[-Infinity, '-OL'],
		[NaN, '—']
	])('shows %d as %j', (value, expected) => {
		expect(formatQuantity(value, 'resistance', { locale: 'en-US' })).toBe(expected);
	});
});

describe('formatQuantity read back with parseDecimal and toBase', () => {
	/** Half a unit of the last digit in the shown number, in base units. */
	function halfLastDigit(number: string, unit: string): number {
		const decimals = number.split(/[.,]/)[1]?.length ?? 0;
		return toBase(0.5 * 10 ** -decimals, unit);
	}

	const cases: [Quantity, number][] = [
		['resistance', 9e8],
		['voltage', 9e5],
		['current', 999],
		['length', 999]
	];

	it.each(cases)(
		'gives back a %s within half a unit of the last digit shown',
		(quantity, maxMagnitude) => {
			const magnitude = fc.double({ min: 1e-6, max: maxMagnitude, noNaN: true });
			const value = fc.tuple(magnitude, fc.boolean()).map(([m, negative]) => (negative ? -m : m));
			const locale = fc.constantFrom('en-US', 'de-DE', 'fr-FR');
			fc.assert(
				fc.property(value, locale, (x, loc) => {
					const shown = formatQuantity(x, quantity, { locale: loc });
					const [number, unit] = shown.split(' ');
					const parsed = parseDecimal(number);
					expect(parsed).not.toBeNull();
					const back = toBase(parsed as number, unit);
					const slack = 1 + 1e-9; // the decimal → binary conversions themselves
					expect(Math.abs(back - x)).toBeLessThanOrEqual(halfLastDigit(number, unit) * slack);
				})
			);
		}
	);
});
