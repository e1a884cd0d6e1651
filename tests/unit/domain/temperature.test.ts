import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import {
	ALUMINIUM_INFERRED_ZERO_C,
	bandFor,
	COPPER_INFERRED_ZERO_C,
	COPPER_INFERRED_ZERO_C_IEC,
	correctResistance,
	inferredZeroOf,
	temperatureCoefficientAt,
	windingTemperature
} from '$lib/domain/temperature';

/** α20 of the International Annealed Copper Standard (IEC 60028; NBS Handbook 100). */
const IACS_ALPHA_20 = 0.00393;

/** R(t) from R(20 °C) with the IACS linear form R20 · (1 + α20 · (t − 20)). */
function iacsResistance(r20: number, tempC: number): number {
	return r20 * (1 + IACS_ALPHA_20 * (tempC - 20));
}

function expectRelativelyClose(actual: number, expected: number, rel: number) {
	expect(Math.abs(actual - expected)).toBeLessThanOrEqual(rel * Math.abs(expected));
}

describe('inferred zero-resistance temperatures', () => {
	it.each([
		['copper', COPPER_INFERRED_ZERO_C, 234.5], // IEEE Std 118, IEEE C57.12.90
		['aluminium', ALUMINIUM_INFERRED_ZERO_C, 225], // IEEE Std 118, IEEE C57.12.90
		['copper per IEC 60076-1', COPPER_INFERRED_ZERO_C_IEC, 235] // IEC 60076-1
	])('uses %s at the published value', (_name, constant, published) => {
		expect(constant).toBe(published);
	});

	it.each([
		['copper', 234.5],
		['aluminium', 225]
	] as const)('looks up %s by name', (material, expected) => {
		expect(inferredZeroOf(material)).toBe(expected);
	});

	it('takes any other constant as a parameter', () => {
		expect(inferredZeroOf({ inferredZeroC: 235 })).toBe(235);
	});
});

describe('copper against the International Annealed Copper Standard (IEC 60028; NBS Handbook 100)', () => {
	it('gives α20 = 1 / (234.5 + 20) = 0.003929…, which rounds to the IACS 0.00393 /K', () => {
		const alpha = temperatureCoefficientAt(20);
		expect(Math.abs(alpha - IACS_ALPHA_20)).toBeLessThan(0.000005); // 0.00393 has 3 digits
		expect(alpha).toBeCloseTo(1 / 254.5, 15);
	});

	// The two forms differ only by α20's rounding to 0.00393 (0.0039293…): at most
	// 0.00393 · 80 K · 0.02 % ≈ 6e-5 relative over the range below.
	it.each([[-20], [0], [50], [75], [100]])(
		'warms 1 Ω from 20 °C to %d °C like R20 · (1 + α20 · Δt) within 1e-4',
		(tempC) => {
			expectRelativelyClose(correctResistance(1, 20, tempC), iacsResistance(1, tempC), 1e-4);
		}
	);

	it.each([[-20], [0], [50], [75], [100]])(
		'cools a winding read at %d °C back to 20 °C like the IACS form within 1e-4',
		(tempC) => {
			const r = iacsResistance(0.45, tempC);
			expectRelativelyClose(correctResistance(r, tempC, 20), 0.45, 1e-4);
		}
	);

	it.each([[0], [50], [75], [100]])(
		'solves for a winding temperature of %d °C from the IACS resistance within 0.05 °C',
		(tempC) => {
			const r = iacsResistance(12000, tempC);
			expect(Math.abs(windingTemperature(12000, 20, r) - tempC)).toBeLessThan(0.05);
		}
	);

	it('returns to the starting resistance after a correction there and back, within 1e-12', () => {
		const temp = fc.double({ min: -40, max: 200, noNaN: true });
		const r = fc.double({ min: 1e-3, max: 1e7, noNaN: true });
		fc.assert(
			fc.property(r, temp, temp, (r0, a, b) => {
				expectRelativelyClose(correctResistance(correctResistance(r0, a, b), b, a), r0, 1e-12);
			})
		);
	});

	it('solves back the temperature it corrected to, within 1e-12 of the absolute (T₀ + t) scale', () => {
		const temp = fc.double({ min: -40, max: 200, noNaN: true });
		const r = fc.double({ min: 1e-3, max: 1e7, noNaN: true });
		fc.assert(
			fc.property(r, temp, temp, (r0, a, b) => {
				const t = windingTemperature(r0, a, correctResistance(r0, a, b));
				expect(Math.abs(t - b)).toBeLessThanOrEqual(1e-12 * (COPPER_INFERRED_ZERO_C + b));
			})
		);
	});
});

describe('correctResistance', () => {
	it.each([
		// (234.5 + 75) / (234.5 + 20) = 309.5 / 254.5 = 1.216110…
		['copper', 'copper', 309.5 / 254.5],
		// (225 + 75) / (225 + 20) = 300 / 245 = 1.224489… (IEEE Std 118 aluminium)
		['aluminium', 'aluminium', 300 / 245],
		// (235 + 75) / (235 + 20) = 310 / 255 = 1.215686… (IEC 60076-1 copper)
		['the IEC constant', { inferredZeroC: 235 }, 310 / 255]
	] as const)(
		'scales 1 Ω from 20 °C to 75 °C for %s by the hand-worked ratio',
		(_n, material, ratio) => {
			expect(correctResistance(1, 20, 75, material)).toBeCloseTo(ratio, 14);
		}
	);

	it('defaults to copper', () => {
		expect(correctResistance(1, 20, 75)).toBe(correctResistance(1, 20, 75, 'copper'));
	});

	it('leaves a resistance unchanged at the same temperature', () => {
		expect(correctResistance(0.4137, 31, 31)).toBe(0.4137);
	});

	it('keeps an over-range reading over range', () => {
		expect(correctResistance(Infinity, 20, 75)).toBe(Infinity);
	});

	it.each([
		[-234.5, 20],
		[20, -234.5],
		[-300, 20],
		[NaN, 20]
	])('throws a RangeError from %d °C to %d °C (at or below −T₀)', (fromC, toC) => {
		expect(() => correctResistance(1, fromC, toC)).toThrow(RangeError);
	});

	it('throws for aluminium at −230 °C, below its floor of −225 °C', () => {
		expect(() => correctResistance(1, -230, 20, 'aluminium')).toThrow(RangeError);
	});

	it('accepts copper at −230 °C, above its floor of −234.5 °C', () => {
		expect(correctResistance(1, -230, 20, 'copper')).toBeGreaterThan(0);
	});
});

describe('windingTemperature', () => {
	it('finds 75 °C from a winding that rose from 0.45 Ω at 20 °C by the ratio 309.5 / 254.5', () => {
		expect(windingTemperature(0.45, 20, (0.45 * 309.5) / 254.5)).toBeCloseTo(75, 10);
	});

	it('uses the aluminium constant when asked: ×300/245 from 20 °C is 75 °C', () => {
		expect(windingTemperature(1, 20, 300 / 245, 'aluminium')).toBeCloseTo(75, 10);
	});

	it.each([[0], [-1], [NaN]])('throws a RangeError for a reference resistance of %d Ω', (rRef) => {
		expect(() => windingTemperature(rRef, 20, 1)).toThrow(RangeError);
	});

	it('gives back the reference temperature for an unchanged resistance', () => {
		expect(windingTemperature(12280, 23.5, 12280)).toBeCloseTo(23.5, 12);
	});
});

describe('bandFor', () => {
	// Ignition coil bands: cold below 50 °C, hot 50–100 °C — common practice.
	const cold = { name: 'cold', fromC: null, toC: 50 };
	const hot = { name: 'hot', fromC: 50, toC: 100 };
	const bands = [cold, hot];

	it.each([
		[20, 'cold'],
		[-30, 'cold'],
		[49.999, 'cold'],
		[50, 'hot'],
		[75, 'hot'],
		[99.999, 'hot']
	])('puts %d °C in the %s band', (tempC, name) => {
		expect(bandFor(bands, tempC)?.name).toBe(name);
	});

	it('finds no band at the open upper end, 100 °C', () => {
		expect(bandFor(bands, 100)).toBeNull();
	});

	it('finds no band for NaN', () => {
		expect(bandFor(bands, NaN)).toBeNull();
	});

	it('finds no band in an empty list', () => {
		expect(bandFor([], 20)).toBeNull();
	});

	it('takes the first of two overlapping bands', () => {
		const all = { name: 'all', fromC: null, toC: null };
		expect(bandFor([all, cold], 20)?.name).toBe('all');
	});

	it('treats a band open on both sides as containing any temperature', () => {
		expect(bandFor([{ fromC: null, toC: null }], -273)).not.toBeNull();
	});
});
