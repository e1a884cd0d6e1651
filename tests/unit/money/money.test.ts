/**
 * Money arithmetic against a general-purpose reference: decimal.js (arbitrary-precision
 * decimals; `ROUND_HALF_UP` there is "round half away from zero", per its documentation),
 * and worked examples done by hand with the figures shown beside each check.
 */
import Decimal from 'decimal.js';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
	divRoundHalfAway,
	formatMoney,
	formatRate,
	parseAmount,
	parseHours,
	parseRate,
	quoteTotals,
	taxOn,
	times,
	toDecimal
} from '../../../src/lib/money';

const D = Decimal.clone({ precision: 60, rounding: Decimal.ROUND_HALF_UP });
const refTax = (net: number, bp: number) =>
	new D(net).times(bp).div(10000).toDecimalPlaces(0, D.ROUND_HALF_UP).toNumber();
const refTimes = (unit: number, milli: number) =>
	new D(unit).times(milli).div(1000).toDecimalPlaces(0, D.ROUND_HALF_UP).toNumber();

describe('rounding half away from zero', () => {
	it('matches decimal.js ROUND_HALF_UP (half away from zero) on ties and non-ties', () => {
		// decimal.js docs: ROUND_HALF_UP "rounds towards nearest neighbour; if equidistant, rounds away from zero".
		for (const [a, b] of [
			[5n, 2n],
			[-5n, 2n],
			[7n, 2n],
			[-7n, 2n],
			[1n, 3n],
			[2n, 3n],
			[-2n, 3n],
			[0n, 7n]
		] as const)
			expect(divRoundHalfAway(a, b)).toBe(
				BigInt(new D(a.toString()).div(b.toString()).toDecimalPlaces(0, D.ROUND_HALF_UP).toFixed(0))
			);
	});
	it('worked by hand: 2.5 → 3, −2.5 → −3, 2.4999 → 2', () => {
		expect(divRoundHalfAway(25n, 10n)).toBe(3n);
		expect(divRoundHalfAway(-25n, 10n)).toBe(-3n);
		expect(divRoundHalfAway(24999n, 10000n)).toBe(2n);
	});
});

describe('tax on a net amount', () => {
	it('worked by hand: 20 % of 12.34 is 2.468 → 2.47; of 12.32 is 2.464 → 2.46', () => {
		expect(taxOn(1234, 2000)).toBe(247);
		expect(taxOn(1232, 2000)).toBe(246);
	});
	it('worked by hand: an exact half cent rounds away from zero — 5 % of ±0.10 is ±0.005 → ±0.01', () => {
		expect(taxOn(10, 500)).toBe(1);
		expect(taxOn(-10, 500)).toBe(-1);
	});
	it('worked by hand: 8.25 % of 199.99 is 16.499175 → 16.50', () => {
		expect(taxOn(19999, 825)).toBe(1650);
	});
	it('agrees with decimal.js on 2,000 random amounts and rates', () => {
		fc.assert(
			fc.property(
				fc.integer({ min: -1_000_000_000_00, max: 1_000_000_000_00 }),
				fc.integer({ min: 0, max: 10000 }),
				(net, bp) => taxOn(net, bp) === refTax(net, bp)
			),
			{ numRuns: 2000 }
		);
	});
	it('refuses a rate that is not whole basis points within 0–100 %', () => {
		expect(() => taxOn(100, 20.5)).toThrow(RangeError);
		expect(() => taxOn(100, 10001)).toThrow(RangeError);
		expect(() => taxOn(0.5, 2000)).toThrow(RangeError);
	});
});

describe('price × quantity', () => {
	it('worked by hand: 1.5 h at 72.50 is 108.75; 0.333 h at 65.00 is 21.645 → 21.65', () => {
		expect(times(7250, 1500)).toBe(10875);
		expect(times(6500, 333)).toBe(2165);
	});
	it('agrees with decimal.js', () => {
		fc.assert(
			fc.property(
				fc.integer({ min: 0, max: 10_000_000_00 }),
				fc.integer({ min: 0, max: 1_000_000 }),
				(u, q) => times(u, q) === refTimes(u, q)
			),
			{ numRuns: 2000 }
		);
	});
	it('never loses a digit where floating point would (0.1 + 0.2)', () => {
		// Floating point: 0.1 + 0.2 = 0.30000000000000004 (IEEE 754 double); in minor units 10 + 20 = 30.
		expect(quoteTotals([
			{ kind: 'other', text: 'a', unitMinor: 10, quantityMilli: 1000 },
			{ kind: 'other', text: 'b', unitMinor: 20, quantityMilli: 1000 }
		], 0).totalMinor).toBe(30);
	});
});

describe('a quote', () => {
	it('worked by hand: a coil, 0.5 h labour and the diagnostic fee at 20 %', () => {
		// coil 48.99 + labour 0.5 × 72.50 = 36.25 + diagnostic 45.00 = net 130.24;
		// tax 20 % = 26.048 → 26.05; total 156.29.
		const q = quoteTotals(
			[
				{ kind: 'part', text: 'Coil', unitMinor: 4899, quantityMilli: 1000 },
				{ kind: 'labour', text: 'Fit coil', unitMinor: 7250, quantityMilli: 500 },
				{ kind: 'diagnostic', text: 'Diagnosis', unitMinor: 4500, quantityMilli: 1000 }
			],
			2000
		);
		expect(q.lines.map((l) => l.amountMinor)).toEqual([4899, 3625, 4500]);
		expect(q.netMinor).toBe(13024);
		expect(q.taxMinor).toBe(2605);
		expect(q.totalMinor).toBe(15629);
		// The same through decimal.js.
		const net = new D('48.99').plus(new D('72.50').times('0.5')).plus('45.00');
		expect(net.times('0.2').toDecimalPlaces(2, D.ROUND_HALF_UP).toFixed(2)).toBe('26.05');
	});
});

describe('typing and showing amounts', () => {
	it('parses typed amounts into minor units, refusing what is not a price', () => {
		expect(parseAmount('12.5', 'GBP')).toBe(1250);
		expect(parseAmount('1,234.56', 'GBP')).toBe(123456);
		expect(parseAmount(' 7 ', 'GBP')).toBe(700);
		expect(parseAmount('1200', 'JPY')).toBe(1200);
		expect(parseAmount('12.345', 'GBP')).toBeNull();
		expect(parseAmount('-3', 'GBP')).toBeNull();
		expect(parseAmount('abc', 'GBP')).toBeNull();
		expect(parseAmount('1.5', 'JPY')).toBeNull();
	});
	it('parses hours and rates', () => {
		expect(parseHours('1.5')).toBe(1500);
		expect(parseHours('0.25')).toBe(250);
		expect(parseHours('x')).toBeNull();
		expect(parseRate('20')).toBe(2000);
		expect(parseRate('8.25')).toBe(825);
		expect(parseRate('100.01')).toBeNull();
	});
	it('shows amounts exactly, compared with decimal.js toFixed', () => {
		for (const m of [0, 5, 99, 100, 123456, -250, 9007199254740991])
			expect(toDecimal(m, 'GBP')).toBe(new D(m).div(100).toFixed(2));
		expect(toDecimal(1200, 'JPY')).toBe('1200');
		expect(formatMoney(123456, 'GBP')).toBe('£1,234.56');
		expect(formatMoney(9007199254740991, 'GBP')).toBe('£90,071,992,547,409.91');
		expect(formatRate(2000)).toBe('20 %');
		expect(formatRate(825)).toBe('8.25 %');
	});
});
