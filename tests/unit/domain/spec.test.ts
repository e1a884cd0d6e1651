import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import { canResolve, uncertainty, type MeterRange } from '$lib/domain/meter';
import {
	expectedBandAt,
	judge,
	judgeAcrossBands,
	suspectUnit,
	type Limits,
	type Verdict
} from '$lib/domain/spec';

// Ignition coil specs — common practice (no published source): cold below 50 °C, hot 50–100 °C.
const PRIMARY_COLD = { min: 0.36, max: 0.55 };
const PRIMARY_HOT = { min: 0.45, max: 0.65 };
const SECONDARY_COLD = { min: 9000, max: 15400 };
const SECONDARY_HOT = { min: 11400, max: 18100 };
const PRIMARY_BANDS = [
	{ name: 'cold', fromC: null, toC: 50, ...PRIMARY_COLD },
	{ name: 'hot', fromC: 50, toC: 100, ...PRIMARY_HOT }
];

/** Invented ±(0.5 % + 2 counts) ranges at two resolutions. */
const COARSE_OHMS: MeterRange = { pctOfReading: 0.5, counts: 2, resolution: 0.1 };
const FINE_OHMS: MeterRange = { pctOfReading: 0.5, counts: 2, resolution: 0.01 };

describe('an ignition coil against its common-practice spec', () => {
	it('finds 0.40 Ω cold within the primary spec', () => {
		expect(judge(0.4, PRIMARY_COLD).verdict).toBe('within');
	});

	it('finds 12.28 kΩ cold within the secondary spec', () => {
		expect(judge(12280, SECONDARY_COLD).verdict).toBe('within');
	});

	it('knows before reading that a 0.1 Ω range at ±(0.5 % + 2) cannot judge the primary', () => {
		expect(canResolve(COARSE_OHMS, PRIMARY_COLD)).toBe(false);
	});

	it('finds 0.30 Ω cold on that 0.1 Ω range borderline: it cannot be told from 0.36 Ω', () => {
		expect(judge(0.3, PRIMARY_COLD, uncertainty(0.3, COARSE_OHMS)).verdict).toBe('borderline');
	});

	it('finds the same 0.30 Ω read on a 0.01 Ω range low', () => {
		expect(judge(0.3, PRIMARY_COLD, uncertainty(0.3, FINE_OHMS)).verdict).toBe('low');
	});

	it.each([
		['primary min', PRIMARY_COLD, PRIMARY_HOT, 'min'],
		['primary max', PRIMARY_COLD, PRIMARY_HOT, 'max'],
		['secondary min', SECONDARY_COLD, SECONDARY_HOT, 'min'],
		['secondary max', SECONDARY_COLD, SECONDARY_HOT, 'max']
	] as const)(
		'scales the cold %s from 20 °C to 75 °C with copper to within 5 % of the hot limit',
		(_name, cold, hot, side) => {
			const scaled = expectedBandAt(cold, 20, 75)[side] as number;
			expect(Math.abs(scaled - hot[side]) / hot[side]).toBeLessThan(0.05);
		}
	);
});

describe('judge', () => {
	it.each([
		[0.36, 0, 'within'], // limits are inclusive
		[0.55, 0, 'within'],
		[0.3599, 0, 'low'],
		[0.5501, 0, 'high'],
		[0.45, 0.05, 'within'],
		[0.37, 0.02, 'borderline'], // [0.35, 0.39] crosses 0.36
		[0.54, 0.02, 'borderline'], // [0.52, 0.56] crosses 0.55
		[0.3, 0.02, 'low'],
		[0.6, 0.02, 'high'],
		[0.45, 1, 'borderline'] // wider than the band: crosses both limits
	])('judges %d Ω ± %d against 0.36–0.55 Ω as %s', (value, u, verdict) => {
		expect(judge(value, PRIMARY_COLD, u).verdict).toBe(verdict);
	});

	// Exactly representable numbers, so "touching" is exact: 0.5 − 0.25 = 0.25.
	it('does not call a value borderline when its interval only touches the lower limit from inside', () => {
		expect(judge(0.5, { min: 0.25, max: 4 }, 0.25).verdict).toBe('within');
	});

	it('calls a value low when its interval only touches the lower limit from below', () => {
		expect(judge(0.5, { min: 0.75, max: 4 }, 0.25).verdict).toBe('low');
	});

	it('calls a value high when its interval only touches the upper limit from above', () => {
		expect(judge(1, { min: 0, max: 0.75 }, 0.25).verdict).toBe('high');
	});

	it.each([
		[{ min: null, max: 0.5 }, -1e9, 'within'],
		[{ min: null, max: 0.5 }, 0.6, 'high'],
		[{ min: 1e6, max: null }, 1e12, 'within'],
		[{ min: 1e6, max: null }, 5e5, 'low'],
		[{ min: null, max: null }, 42, 'within']
	] as const)('judges against %j: %d is %s', (limits, value, verdict) => {
		expect(judge(value, limits).verdict).toBe(verdict);
	});

	it.each([
		[0.4, 'min', 0.04, (0.04 / 0.36) * 100],
		[0.3, 'min', -0.06, (-0.06 / 0.36) * 100],
		[0.6, 'max', -0.05, (-0.05 / 0.55) * 100],
		[0.5, 'max', 0.05, (0.05 / 0.55) * 100]
	] as const)(
		'measures %d Ω from the nearest limit (%s): margin %d',
		(value, nearest, margin, pct) => {
			const result = judge(value, PRIMARY_COLD);
			expect(result.nearest).toBe(nearest);
			expect(result.margin).toBeCloseTo(margin, 12);
			expect(result.marginPct).toBeCloseTo(pct, 9);
		}
	);

	it('gives no percentage margin against a limit of zero', () => {
		expect(judge(1, { min: 0, max: 10 })).toMatchObject({
			nearest: 'min',
			margin: 1,
			marginPct: null
		});
	});

	it('gives an infinite margin and no nearest limit without limits', () => {
		expect(judge(1, { min: null, max: null })).toEqual({
			verdict: 'within',
			margin: Infinity,
			marginPct: null,
			nearest: null
		});
	});

	it('judges an over-range reading high', () => {
		expect(judge(Infinity, SECONDARY_COLD)).toMatchObject({ verdict: 'high', nearest: 'max' });
	});

	it('judges an over-range reading within when the check accepts an open circuit', () => {
		expect(judge(Infinity, SECONDARY_COLD, 0, { openOk: true }).verdict).toBe('within');
	});

	it('judges an over-range reading high even without a maximum unless open is accepted', () => {
		expect(judge(Infinity, { min: 1e6, max: null })).toMatchObject({
			verdict: 'high',
			nearest: null
		});
	});

	it('judges a negative over-range reading low', () => {
		expect(judge(-Infinity, { min: -1, max: 1 }).verdict).toBe('low');
	});

	it('throws a RangeError for a NaN value', () => {
		expect(() => judge(NaN, PRIMARY_COLD)).toThrow(RangeError);
	});

	it.each([[-0.01], [NaN]])('throws a RangeError for an uncertainty of %d', (u) => {
		expect(() => judge(0.4, PRIMARY_COLD, u)).toThrow(RangeError);
	});

	it('throws a RangeError for a NaN limit', () => {
		expect(() => judge(0.4, { min: NaN, max: 0.55 })).toThrow(RangeError);
	});

	it('throws a RangeError for limits with min above max', () => {
		expect(() => judge(0.4, { min: 0.55, max: 0.36 })).toThrow(RangeError);
	});
});

describe('judge, properties', () => {
	const RANK: Record<Verdict, number> = { low: 0, borderline: 1, within: 1, high: 2 };
	const finite = fc.double({ min: -1e6, max: 1e6, noNaN: true });
	const limits = fc.tuple(fc.option(finite), fc.option(finite)).map(([a, b]): Limits => {
		if (a !== null && b !== null && a > b) return { min: b, max: a };
		return { min: a, max: b };
	});
	const u = fc.oneof(fc.constant(0), fc.double({ min: 0, max: 1e5, noNaN: true }));

	it('never moves the verdict back as the value grows (low < borderline/within < high)', () => {
		fc.assert(
			fc.property(limits, u, finite, finite, (l, unc, a, b) => {
				const [lo, hi] = a <= b ? [a, b] : [b, a];
				expect(RANK[judge(lo, l, unc).verdict]).toBeLessThanOrEqual(
					RANK[judge(hi, l, unc).verdict]
				);
			})
		);
	});

	it('never moves the verdict back as the value grows, with no uncertainty', () => {
		fc.assert(
			fc.property(limits, finite, finite, (l, a, b) => {
				const [lo, hi] = a <= b ? [a, b] : [b, a];
				expect(RANK[judge(lo, l).verdict]).toBeLessThanOrEqual(RANK[judge(hi, l).verdict]);
			})
		);
	});

	it('never turns borderline into within with a larger uncertainty', () => {
		fc.assert(
			fc.property(limits, finite, u, u, (l, value, u1, u2) => {
				const [small, large] = u1 <= u2 ? [u1, u2] : [u2, u1];
				fc.pre(judge(value, l, small).verdict === 'borderline');
				expect(judge(value, l, large).verdict).not.toBe('within');
			})
		);
	});

	it('is never borderline with no uncertainty', () => {
		fc.assert(
			fc.property(limits, finite, (l, value) => {
				expect(judge(value, l).verdict).not.toBe('borderline');
			})
		);
	});
});

describe('expectedBandAt', () => {
	it('scales both limits by the copper ratio (234.5 + 75) / (234.5 + 20)', () => {
		const band = expectedBandAt(PRIMARY_COLD, 20, 75);
		expect(band.min).toBeCloseTo((0.36 * 309.5) / 254.5, 14);
		expect(band.max).toBeCloseTo((0.55 * 309.5) / 254.5, 14);
	});

	it('keeps a null limit null', () => {
		expect(expectedBandAt({ min: null, max: 0.5 }, 20, 75).min).toBeNull();
	});

	it('keeps the other fields of the band', () => {
		expect(expectedBandAt(PRIMARY_BANDS[0], 20, 75)).toMatchObject({ name: 'cold', toC: 50 });
	});

	it('uses another conductor when asked: aluminium scales by 300 / 245', () => {
		expect(expectedBandAt({ min: 1, max: null }, 20, 75, 'aluminium').min).toBeCloseTo(
			300 / 245,
			14
		);
	});
});

describe('suspectUnit', () => {
	it('suspects kilohms typed as ohms: 12.28 against 9–15.4 kΩ', () => {
		const suspicion = suspectUnit(12.28, SECONDARY_COLD);
		expect(suspicion?.factor).toBe(1000);
		expect(suspicion?.value).toBeCloseTo(12280, 9);
	});

	it('suspects milliohms typed as ohms: 400 against 0.36–0.55 Ω', () => {
		expect(suspectUnit(400, PRIMARY_COLD)?.factor).toBe(1e-3);
	});

	it('suspects a value two prefix steps away: 0.0123 against 9–15.4 kΩ (MΩ typed as Ω)', () => {
		expect(suspectUnit(0.0123, SECONDARY_COLD)?.factor).toBe(1e6);
	});

	it.each([
		['a value within the spec', 12280, SECONDARY_COLD],
		['a value no prefix brings inside', 2, SECONDARY_COLD],
		['a one-sided spec', 0.5, { min: 1e6, max: null }],
		['a zero reading', 0, SECONDARY_COLD],
		['an over-range reading', Infinity, SECONDARY_COLD],
		['a value just outside the spec', 0.3, PRIMARY_COLD]
	])('suspects nothing for %s', (_name, value, limits) => {
		expect(suspectUnit(value, limits)).toBeNull();
	});
});

describe('judgeAcrossBands', () => {
	it('judges only the band for a temperature far from any edge', () => {
		const { results, agree } = judgeAcrossBands(0.58, PRIMARY_BANDS, 20);
		expect(results.map((r) => r.band.name)).toEqual(['cold']);
		expect(agree).toBe(true);
	});

	it('judges the cold band first and the hot band too at 48 °C', () => {
		const { results } = judgeAcrossBands(0.58, PRIMARY_BANDS, 48);
		expect(results.map((r) => [r.band.name, r.judgement.verdict])).toEqual([
			['cold', 'high'],
			['hot', 'within']
		]);
	});

	it('reports disagreement when the two bands give different verdicts', () => {
		expect(judgeAcrossBands(0.58, PRIMARY_BANDS, 48).agree).toBe(false);
	});

	it('reports agreement when both bands find the value within', () => {
		expect(judgeAcrossBands(0.5, PRIMARY_BANDS, 52).agree).toBe(true);
	});

	it('puts the hot band first at 52 °C', () => {
		const { results } = judgeAcrossBands(0.5, PRIMARY_BANDS, 52);
		expect(results.map((r) => r.band.name)).toEqual(['hot', 'cold']);
	});

	it('looks at no neighbour with a margin of 0 °C', () => {
		expect(judgeAcrossBands(0.58, PRIMARY_BANDS, 49, { marginC: 0 }).results).toHaveLength(1);
	});

	it('passes the uncertainty on to each judgement', () => {
		const { results } = judgeAcrossBands(0.37, PRIMARY_BANDS, 20, { u: 0.02 });
		expect(results[0].judgement.verdict).toBe('borderline');
	});

	it('finds no band for a temperature no band covers', () => {
		expect(judgeAcrossBands(0.5, PRIMARY_BANDS, 150).results).toEqual([]);
	});
});
