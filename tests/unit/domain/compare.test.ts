import { describe, it, expect } from 'vitest';
import { compareToReference, findOutliers, medianOf } from '$lib/domain/compare';

// Invented secondary resistances of four ignition coils, ohms.
const SECONDARIES = { '1': 12300, '2': 12100, '3': 12400, '4': 15900 };
// Invented primary resistances with one shorted turn's worth too low, ohms.
const PRIMARIES = { '1': 0.45, '2': 0.46, '3': 0.3, '4': 0.44 };

describe('medianOf', () => {
	it.each([
		[[3, 1, 2], 2],
		[[4, 1, 3, 2], 2.5],
		[[5], 5],
		[[1, Infinity, 2], 2],
		[[1, Infinity], Infinity],
		[[NaN, 4, 6], 5]
	])('finds the median of %j: %d', (values, expected) => {
		expect(medianOf(values)).toBe(expected);
	});

	it('gives null for an empty list', () => {
		expect(medianOf([])).toBeNull();
	});

	it('does not reorder the list it is given', () => {
		const values = [3, 1, 2];
		medianOf(values);
		expect(values).toEqual([3, 1, 2]);
	});
});

describe('compareToReference', () => {
	it.each([
		[110, 100, 0.1, 0], // exactly at the tolerance is still inside
		[110.5, 100, 0.1, 1],
		[89.5, 100, 0.1, -1],
		[1, 0, 0.5, 1], // any non-zero value is off a zero reference
		[Infinity, 100, 0.1, 1],
		[100, Infinity, 0.1, -1],
		[Infinity, Infinity, 0.1, 0]
	] as const)('places %d against %d ± %d as %d', (value, reference, tolerance, expected) => {
		expect(compareToReference(value, reference, tolerance)).toBe(expected);
	});
});

describe('findOutliers', () => {
	it('flags the coil whose secondary is 29 % above the others', () => {
		expect(findOutliers(SECONDARIES, { tolerance: 0.1, direction: 'both' })).toEqual(['4']);
	});

	it('flags a high outlier when asked for high ones', () => {
		expect(findOutliers(SECONDARIES, { tolerance: 0.1, direction: 'high' })).toEqual(['4']);
	});

	it('ignores a high outlier when asked for low ones', () => {
		expect(findOutliers(SECONDARIES, { tolerance: 0.1, direction: 'low' })).toEqual([]);
	});

	it('flags a low outlier when asked for low ones', () => {
		expect(findOutliers(PRIMARIES, { tolerance: 0.1, direction: 'low' })).toEqual(['3']);
	});

	it('ignores a low outlier when asked for high ones', () => {
		expect(findOutliers(PRIMARIES, { tolerance: 0.1, direction: 'high' })).toEqual([]);
	});

	it('flags nothing when the tolerance is wider than the spread', () => {
		expect(findOutliers(SECONDARIES, { tolerance: 0.5, direction: 'both' })).toEqual([]);
	});

	it('compares with the median of the other positions, not of all', () => {
		// The median of all is 11.5, which 13 is within 25 % of; the median of the others of 'c'
		// is 10, so 'c' is 30 % high ('d' 50 %).
		const values = { a: 10, b: 10, c: 13, d: 15 };
		expect(findOutliers(values, { tolerance: 0.25, direction: 'high' })).toEqual(['c', 'd']);
	});

	it('does not flag a value exactly at the tolerance', () => {
		expect(
			findOutliers({ a: 100, b: 100, c: 100, d: 110 }, { tolerance: 0.1, direction: 'both' })
		).toEqual([]);
	});

	it('flags a value just beyond the tolerance', () => {
		const values = { a: 100, b: 100, c: 100, d: 110.5 };
		expect(findOutliers(values, { tolerance: 0.1, direction: 'both' })).toEqual(['d']);
	});

	it('flags an open (OL) position among finite ones', () => {
		expect(
			findOutliers({ ...SECONDARIES, '4': Infinity }, { tolerance: 0.1, direction: 'high' })
		).toEqual(['4']);
	});

	it.each([[{}], [{ a: 1 }], [{ a: 1, b: 100 }]])(
		'flags nothing with fewer than three values: %j',
		(values) => {
			expect(findOutliers(values, { tolerance: 0.1, direction: 'both' })).toEqual([]);
		}
	);

	it('does not count NaN entries towards the three values', () => {
		expect(findOutliers({ a: 1, b: 100, c: NaN }, { tolerance: 0.1, direction: 'both' })).toEqual(
			[]
		);
	});

	it('never flags a NaN entry', () => {
		const values = { ...SECONDARIES, '5': NaN };
		expect(findOutliers(values, { tolerance: 0.1, direction: 'both' })).toEqual(['4']);
	});

	it('compares three values with the median of all: 0.50 / 0.50 / 0.80 flags only 0.80', () => {
		// With the median of the others, each 0.50 would meet (0.50 + 0.80) / 2 = 0.65 and be
		// 23 % off, so all three were flagged.
		expect(findOutliers({ a: 0.5, b: 0.5, c: 0.8 }, { tolerance: 0.1, direction: 'both' })).toEqual(['c']);
	});

	it('finds a low one of three against the median of all: 0.30 / 0.45 / 0.46', () => {
		expect(findOutliers({ 1: 0.3, 2: 0.45, 3: 0.46 }, { tolerance: 0.1, direction: 'both' })).toEqual(['1']);
	});

	it('never flags a difference smaller than the two readings’ combined ±', () => {
		// 0.10 / 0.10 / 0.13 Ω on a 0.1 Ω-count range at ±(0.5 % + 2): 0.13 is 30 % off but only
		// 0.03 Ω away, well inside 0.2007 + 0.2005 Ω (meter accuracy form; worst-case sum).
		const values = { a: 0.1, b: 0.1, c: 0.13 };
		const uncertainty = { a: 0.2005, b: 0.2005, c: 0.20065 };
		expect(findOutliers(values, { tolerance: 0.1, direction: 'both', uncertainty })).toEqual([]);
		expect(findOutliers(values, { tolerance: 0.1, direction: 'both' })).toEqual(['c']);
	});

	it('flags beyond the combined ± when the difference is larger: 0.75 among 0.42–0.44 with ±0.022', () => {
		const values = { 1: 0.42, 2: 0.43, 3: 0.75, 4: 0.44 };
		const uncertainty = { 1: 0.0221, 2: 0.0222, 3: 0.0238, 4: 0.0222 };
		expect(findOutliers(values, { tolerance: 0.1, direction: 'both', uncertainty })).toEqual(['3']);
	});

	it('compares an OL position without the ±', () => {
		const uncertainty = { '1': 108, '2': 107, '3': 109, '4': 0 };
		expect(findOutliers({ ...SECONDARIES, '4': Infinity }, { tolerance: 0.1, direction: 'both', uncertainty })).toEqual(['4']);
	});

	it.each([[-0.1], [NaN]])('throws a RangeError for a tolerance of %d', (tolerance) => {
		expect(() => findOutliers(SECONDARIES, { tolerance, direction: 'both' })).toThrow(RangeError);
	});
});
