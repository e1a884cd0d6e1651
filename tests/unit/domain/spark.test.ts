import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import {
	breakdownVoltage,
	PA_PER_TORR,
	PASCHEN_AIR,
	paschenMinimum,
	STANDARD_PRESSURE_PA
} from '$lib/domain/spark';

function expectRelativelyClose(actual: number, expected: number, rel: number) {
	expect(Math.abs(actual - expected)).toBeLessThanOrEqual(rel * Math.abs(expected));
}

describe('Paschen constants for air', () => {
	it('defines the torr as 101 325 / 760 Pa', () => {
		expect(PA_PER_TORR).toBeCloseTo(133.322368, 6);
	});

	// The Wikipedia article "Paschen's law" quotes A = 112.50 /(kPa·cm) and
	// B = 2737.50 V/(kPa·cm) for air: Raizer's 15 and 365 per cm·Torr with 1 kPa ≈ 7.5 Torr.
	it('converts A = 15 /(cm·Torr) (Raizer, Table 4.1) to within 0.1 % of 112.50 /(kPa·cm)', () => {
		expectRelativelyClose(PASCHEN_AIR.a, 112.5 / (1000 * 0.01), 1e-3);
	});

	it('converts B = 365 V/(cm·Torr) (Raizer, Table 4.1) to within 0.1 % of 2737.50 V/(kPa·cm)', () => {
		expectRelativelyClose(PASCHEN_AIR.b, 2737.5 / (1000 * 0.01), 1e-3);
	});
});

describe('paschenMinimum', () => {
	// By hand: ln(1 + 1/0.01) = ln 101 = 4.61512; pd_min = e · 4.61512 / 15 = 0.836347 cm·Torr;
	// V_min = 365 · 0.836347 = 305.27 V.
	it('lies at the hand-computed 0.836347 cm·Torr', () => {
		expect(paschenMinimum().pd / (0.01 * PA_PER_TORR)).toBeCloseTo(0.836347, 5);
	});

	it('is the hand-computed 305.27 V', () => {
		expect(paschenMinimum().volts).toBeCloseTo(305.27, 2);
	});

	it('is within 10 % of the 327 V minimum commonly cited for air (Wikipedia, "Paschen\'s law")', () => {
		expectRelativelyClose(paschenMinimum().volts, 327, 0.1);
	});

	it('is what breakdownVoltage gives at that p·d', () => {
		const { pd, volts } = paschenMinimum();
		expectRelativelyClose(breakdownVoltage(pd / STANDARD_PRESSURE_PA), volts, 1e-12);
	});

	it.each([[0.9], [1.1]])('is below breakdownVoltage at %d × its p·d', (factor) => {
		const { pd, volts } = paschenMinimum();
		expect(breakdownVoltage((factor * pd) / STANDARD_PRESSURE_PA)).toBeGreaterThan(volts);
	});
});

describe('breakdownVoltage', () => {
	// By hand for 1 mm at 760 Torr: p·d = 76 cm·Torr; A·p·d = 1140; ln 1140 = 7.03878;
	// minus ln ln 101 = 1.52934 gives 5.50945; B·p·d = 27 740 V; 27 740 / 5.50945 = 5035 V.
	it('estimates a 1 mm gap in air at one atmosphere at the hand-computed 5035 V', () => {
		expect(breakdownVoltage(1e-3)).toBeCloseTo(5035, 0);
	});

	// Dielectric strength of air, about 3 MV/m for centimetre gaps — commonly tabulated,
	// quoted from memory: 30 kV across 1 cm.
	it('estimates a 1 cm gap within 25 % of the 3 MV/m dielectric strength of air', () => {
		expectRelativelyClose(breakdownVoltage(0.01), 30000, 0.25);
	});

	it('uses standard atmospheric pressure by default', () => {
		expect(breakdownVoltage(8e-4)).toBe(breakdownVoltage(8e-4, 101325));
	});

	it('depends only on pressure times gap (the similarity law)', () => {
		const gap = fc.double({ min: 1e-4, max: 1e-2, noNaN: true });
		const pressure = fc.double({ min: 1e4, max: 5e6, noNaN: true });
		const k = fc.double({ min: 0.5, max: 4, noNaN: true });
		fc.assert(
			fc.property(gap, pressure, k, (d, p, factor) => {
				expectRelativelyClose(
					breakdownVoltage(d, factor * p),
					breakdownVoltage(factor * d, p),
					1e-12
				);
			})
		);
	});

	it('grows with the gap right of the minimum', () => {
		const gap = fc.double({ min: 2e-5, max: 0.1, noNaN: true });
		fc.assert(
			fc.property(gap, gap, (a, b) => {
				fc.pre(b > a * (1 + 1e-9)); // neighbouring doubles can round either way
				expect(breakdownVoltage(a)).toBeLessThan(breakdownVoltage(b));
			})
		);
	});

	it('needs more voltage for a 0.8 mm plug gap at 1 MPa in the cylinder than in open air', () => {
		expect(breakdownVoltage(8e-4, 1e6)).toBeGreaterThan(breakdownVoltage(8e-4));
	});

	it('predicts no breakdown left of the asymptote: 1 µm at one atmosphere', () => {
		// A·p·d = 15 · 0.076 = 1.14 < ln 101 = 4.62, so the denominator is negative.
		expect(breakdownVoltage(1e-6)).toBe(Infinity);
	});

	it.each([
		[0, 101325],
		[-1e-3, 101325],
		[NaN, 101325],
		[1e-3, 0],
		[1e-3, -1],
		[1e-3, NaN]
	])('throws a RangeError for a gap of %d m at %d Pa', (gap, pressure) => {
		expect(() => breakdownVoltage(gap, pressure)).toThrow(RangeError);
	});
});
