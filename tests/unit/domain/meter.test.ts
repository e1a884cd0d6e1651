import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import {
	canResolve,
	compensatedUncertainty,
	compensateLeads,
	isBadZero,
	isHighestRange,
	pickSettled,
	resolvingRatio,
	settledValue,
	uncertainty,
	type MeterRange
} from '$lib/domain/meter';

/** Ignition coil primary, cold (below 50 °C): 0.36–0.55 Ω — common practice. */
const PRIMARY_COLD = { min: 0.36, max: 0.55 };
/** Ignition coil secondary, cold: 9–15.4 kΩ — common practice. */
const SECONDARY_COLD = { min: 9000, max: 15400 };

/** Invented ranges; accuracy in the ±(% of reading + counts) form. */
const COARSE_OHMS: MeterRange = { pctOfReading: 0.5, counts: 2, resolution: 0.1 };
const FINE_OHMS: MeterRange = { pctOfReading: 0.5, counts: 2, resolution: 0.01 };

describe('compensateLeads', () => {
	it.each([
		[0.52, 0.12, 0.4],
		[12280.2, 0.2, 12280],
		[0.12, 0.12, 0],
		[0.1, 0.12, 0],
		[Infinity, 0.2, Infinity]
	])('turns a reading of %d Ω with %d Ω leads into %d Ω', (reading, leads, expected) => {
		expect(compensateLeads(reading, leads)).toBeCloseTo(expected, 12);
	});

	it('never returns a negative, whatever the reading and the lead resistance', () => {
		const reading = fc.double({ noNaN: true });
		const leads = fc.double({ noNaN: true, noDefaultInfinity: true });
		fc.assert(
			fc.property(reading, leads, (r, l) => {
				expect(compensateLeads(r, l)).toBeGreaterThanOrEqual(0);
			})
		);
	});
});

describe('isBadZero', () => {
	it.each([
		[0.1, 0.12, true],
		[0.12, 0.12, false],
		[0.5, 0.12, false]
	])('says %s for a reading of %d Ω with %d Ω leads', (reading, leads, expected) => {
		expect(isBadZero(reading, leads)).toBe(expected);
	});

	it('says a reading below the leads is a bad zero on a range that shows the leads (0.01 Ω count)', () => {
		// 0.15 Ω read with 0.20 Ω leads: the part cannot read less than the leads in series.
		expect(isBadZero(0.15, 0.2, 0.01)).toBe(true);
	});

	it('does not call 0 read on a 10 Ω-count range a bad zero: 0.20 Ω leads do not show there', () => {
		expect(isBadZero(0, 0.2, 10)).toBe(false);
	});
});

describe('compensatedUncertainty', () => {
	// The meter's accuracy specification form ±(% of reading + counts), one count being the
	// range's resolution; the two limits of error are added (worst-case linear sum, common
	// practice: a limit of error is not a standard deviation, so no root-sum-square).
	it('is ±0.04405 Ω for 0.61 Ω read with 0.20 Ω leads at ±(0.5 % + 2 counts), 0.01 Ω resolution', () => {
		// (0.61 × 0.5 % + 2 × 0.01) + (0.20 × 0.5 % + 2 × 0.01) = 0.02305 + 0.021 = 0.04405.
		expect(compensatedUncertainty(0.61, 0.2, FINE_OHMS)).toBeCloseTo(0.04405, 12);
	});

	it('is worked out on what the meter showed, not on the 0.41 Ω left after the leads', () => {
		// The old figure, u(0.41) = 0.00205 + 0.02 = 0.02205 Ω, ignored the lead reading's error.
		expect(compensatedUncertainty(0.61, 0.2, FINE_OHMS)).not.toBeCloseTo(uncertainty(0.41, FINE_OHMS), 3);
	});

	it('takes the lead reading’s error on the range the leads were read on', () => {
		// 12.28 kΩ at ±(0.8 % + 1), 10 Ω → 108.24 Ω; leads 0.20 Ω on the 0.01 Ω range → 0.021 Ω.
		const kilo = { pctOfReading: 0.8, counts: 1, resolution: 10 };
		expect(compensatedUncertainty(12280.2, 0.2, kilo, FINE_OHMS)).toBeCloseTo(108.24 + 0.021 + 0.0016, 9);
	});

	it('adds the counts of the lead reading even when the leads read 0', () => {
		expect(compensatedUncertainty(0.5, 0, FINE_OHMS)).toBeCloseTo(0.0025 + 0.02 + 0.02, 12);
	});
});

describe('isHighestRange', () => {
	const ranges = [
		{ resolution: 0.01, maxReading: 19.99 },
		{ resolution: 0.1, maxReading: 199.9 },
		{ resolution: 100, maxReading: 199900 }
	];
	it.each([
		[0, false],
		[1, false],
		[2, true]
	])('says range %d of 20 Ω / 200 Ω / 200 kΩ is the highest: %s', (i, expected) => {
		expect(isHighestRange(ranges[i], ranges)).toBe(expected);
	});

	it('compares by resolution when a range states no largest reading', () => {
		const loose = [{ resolution: 0.1 }, { resolution: 10 }];
		expect([isHighestRange(loose[0], loose), isHighestRange(loose[1], loose)]).toEqual([false, true]);
	});

	it('calls the only range the highest', () => {
		expect(isHighestRange(ranges[0], [ranges[0]])).toBe(true);
	});
});

describe('uncertainty', () => {
	// Worked by hand from the definition of the ±(% of reading + counts) form: a percentage
	// of the reading plus a number of counts of the range's last digit (its resolution).
	it.each([
		// The textbook case repeated in meter application notes (from memory, no maker named):
		// 100.0 V on a 0.1 V range at ±(1 % + 2) → 1.0 V + 0.2 V = ±1.2 V, i.e. 98.8–101.2 V.
		[
			'100.0 V at ±(1 % + 2), 0.1 V resolution',
			100,
			{ pctOfReading: 1, counts: 2, resolution: 0.1 },
			1.2
		],
		// 120 V at ±(1 % + 3), 0.1 V resolution → 1.2 V + 0.3 V = ±1.5 V (same kind of note).
		[
			'120.0 V at ±(1 % + 3), 0.1 V resolution',
			120,
			{ pctOfReading: 1, counts: 3, resolution: 0.1 },
			1.5
		],
		// 0.30 Ω at ±(0.5 % + 2), 0.1 Ω → 0.0015 + 0.2 = ±0.2015 Ω.
		['0.30 Ω at ±(0.5 % + 2), 0.1 Ω resolution', 0.3, COARSE_OHMS, 0.2015],
		// 0.30 Ω at ±(0.5 % + 2), 0.01 Ω → 0.0015 + 0.02 = ±0.0215 Ω.
		['0.30 Ω at ±(0.5 % + 2), 0.01 Ω resolution', 0.3, FINE_OHMS, 0.0215],
		// 12.28 kΩ at ±(0.8 % + 1), 10 Ω → 98.24 + 10 = ±108.24 Ω.
		[
			'12.28 kΩ at ±(0.8 % + 1), 10 Ω resolution',
			12280,
			{ pctOfReading: 0.8, counts: 1, resolution: 10 },
			108.24
		],
		// A negative reading counts by its size: −12.60 V at ±(0.5 % + 2), 0.01 V → 0.063 + 0.02.
		[
			'−12.60 V at ±(0.5 % + 2), 0.01 V resolution',
			-12.6,
			{ pctOfReading: 0.5, counts: 2, resolution: 0.01 },
			0.083
		],
		// A zero reading keeps only the counts: 2 × 0.1 Ω.
		['0 Ω at ±(0.5 % + 2), 0.1 Ω resolution', 0, COARSE_OHMS, 0.2]
	])('is ± the hand-worked value for %s', (_name, reading, range, expected) => {
		expect(uncertainty(reading, range)).toBeCloseTo(expected, 12);
	});

	it('is infinite for an over-range reading', () => {
		expect(uncertainty(Infinity, COARSE_OHMS)).toBe(Infinity);
	});
});

describe('canResolve', () => {
	it('says a 0.1 Ω range at ±(0.5 % + 2) cannot judge a coil primary of 0.36–0.55 Ω (common practice spec)', () => {
		expect(canResolve(COARSE_OHMS, PRIMARY_COLD)).toBe(false);
	});

	it('says a 0.01 Ω range at ±(0.5 % + 2) can judge the same coil primary', () => {
		expect(canResolve(FINE_OHMS, PRIMARY_COLD)).toBe(true);
	});

	it('computes the ratio as the half-width over the larger uncertainty of the two limits', () => {
		// Half-width (0.55 − 0.36) / 2 = 0.095; u(0.55) = 0.00275 + 0.02 = 0.02275 → 4.176.
		expect(resolvingRatio(FINE_OHMS, PRIMARY_COLD)).toBeCloseTo(0.095 / 0.02275, 12);
	});

	it('says a 10 Ω range at ±(0.8 % + 1) can judge a coil secondary of 9–15.4 kΩ', () => {
		expect(canResolve({ pctOfReading: 0.8, counts: 1, resolution: 10 }, SECONDARY_COLD)).toBe(true);
	});

	it('says a range that shows at most 1999 Ω cannot judge a limit of 15.4 kΩ', () => {
		const range = { pctOfReading: 0.8, counts: 1, resolution: 1, maxReading: 1999 };
		expect(canResolve(range, SECONDARY_COLD)).toBe(false);
	});

	it.each([
		// One-sided: T = |limit|. 0.5 / (0.0025 + 0.2) = 2.47 < 4.
		['0.1 Ω', COARSE_OHMS, false],
		// 0.5 / (0.0025 + 0.02) = 22.2 ≥ 4.
		['0.01 Ω', FINE_OHMS, true]
	])('judges a one-sided limit of at most 0.5 Ω on a %s range as %s', (_name, range, expected) => {
		expect(canResolve(range, { min: null, max: 0.5 })).toBe(expected);
	});

	it('counts at least half a count of resolution even when the accuracy has no counts', () => {
		// u = max(0, 0.1 / 2) = 0.05 → 0.095 / 0.05 = 1.9 < 4.
		expect(canResolve({ pctOfReading: 0, counts: 0, resolution: 0.1 }, PRIMARY_COLD)).toBe(false);
	});

	it('can resolve a spec with no limits', () => {
		expect(canResolve(COARSE_OHMS, { min: null, max: null })).toBe(true);
	});

	it('takes a stricter ratio when asked', () => {
		expect(canResolve(FINE_OHMS, PRIMARY_COLD, 5)).toBe(false);
	});
});

describe('settledValue', () => {
	it.each([
		['lowest', [0.42, 0.4, 0.41], 0.4],
		['median', [12100, 12400, 12200], 12200],
		['median', [1, 2, 3, 4], 2.5],
		['median', [7], 7],
		['lowest', [0.4, Infinity, 0.41], 0.4],
		['median', [0.4, Infinity, 0.41], 0.41],
		['median', [Infinity, Infinity], Infinity],
		['lowest', [NaN, 0.5], 0.5]
	] as const)('takes the %s of %j as %d', (mode, samples, expected) => {
		expect(settledValue(samples, mode)).toBe(expected);
	});

	it.each([['lowest'], ['median']] as const)('gives null for no samples (%s)', (mode) => {
		expect(settledValue([], mode)).toBeNull();
	});

	it('gives null when every sample is NaN', () => {
		expect(settledValue([NaN, NaN], 'median')).toBeNull();
	});
});

describe('pickSettled', () => {
	it('keeps the lowest sample below 10 Ω (common practice: contact resistance only adds)', () => {
		expect(pickSettled([0.42, 0.4, 0.41])).toEqual({ value: 0.4, mode: 'lowest', suspects: [] });
	});

	it('keeps the median at 10 Ω and above', () => {
		expect(pickSettled([12300, 12250, 12280])).toMatchObject({ value: 12280, mode: 'median' });
	});

	it('decides between the two by the median, so exactly 10 Ω takes the median', () => {
		expect(pickSettled([9.9, 10, 10.1])).toMatchObject({ value: 10, mode: 'median' });
	});

	it('takes the lowest when the median is just below 10 Ω', () => {
		expect(pickSettled([9.8, 9.9, 10.1])).toMatchObject({ value: 9.8, mode: 'lowest' });
	});

	it('flags a sample far from the others by its index', () => {
		expect(pickSettled([0.4, 0.41, 0.55])?.suspects).toEqual([2]);
	});

	it('never settles on a flagged sample: 0.20 among 0.41 and 0.42 is left out, 0.41 kept', () => {
		// Median 0.41; 0.20 is 51 % below it. The plain lowest would have been the flagged 0.20.
		expect(pickSettled([0.2, 0.41, 0.42])).toEqual({ value: 0.41, mode: 'lowest', suspects: [0] });
	});

	it('flags an OL sample among finite ones and settles on the others', () => {
		expect(pickSettled([12300, Infinity, 12280])).toMatchObject({ value: 12290, suspects: [1] });
	});

	it('does not flag a difference the meter cannot resolve (within the combined ±)', () => {
		// 0.05 / 0.06 / 0.07 Ω at ±(0.5 % + 2 counts), 0.01 Ω: 0.07 is 17 % off the median but
		// only 0.01 Ω away, less than u(0.07) + u(0.06) = 0.02035 + 0.0203.
		const uncertaintyOf = (v: number) => uncertainty(v, FINE_OHMS);
		expect(pickSettled([0.05, 0.06, 0.07], { uncertaintyOf })?.suspects).toEqual([]);
		expect(pickSettled([0.05, 0.06, 0.07])?.suspects).toEqual([0, 2]);
	});

	it('takes the median when told to, whatever the value (voltage, current)', () => {
		expect(pickSettled([0.42, 0.4, 0.41], { mode: 'median' })).toMatchObject({ value: 0.41, mode: 'median' });
	});

	it('flags nothing with only two samples', () => {
		expect(pickSettled([0.4, 0.9])?.suspects).toEqual([]);
	});

	it('gives null for no samples', () => {
		expect(pickSettled([])).toBeNull();
	});
});
