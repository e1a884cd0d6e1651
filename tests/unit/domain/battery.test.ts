import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import {
	crankingCapability,
	daysToFlat,
	dropResistance,
	j541DropLimit,
	loadTestMinimum,
	REST_VOLTS_PER_C,
	stateOfCharge,
	stateOfChargeDetail
} from '$lib/domain/battery';

/** 80 °F and 70 °F in °C (the flooded table's reference and one 10 °F step below it). */
const F80 = (80 - 32) * (5 / 9);
const F70 = (70 - 32) * (5 / 9);

describe('state of charge from rest voltage', () => {
	// Battery Council International rest-voltage table (flooded, 80 °F), as battery makers reproduce it.
	it.each([
		[12.65, 1],
		[12.45, 0.75],
		[12.24, 0.5],
		[12.06, 0.25],
		[11.89, 0]
	])('reads a flooded battery at %f V and 80 °F as %f', (volts, soc) => {
		expect(stateOfCharge(volts, 'flooded', F80)).toBeCloseTo(soc, 6);
	});

	it('interpolates between the table points (12.345 V is halfway from 50 % to 75 %)', () => {
		// Linear between the BCI points 12.24 V (50 %) and 12.45 V (75 %).
		expect(stateOfCharge(12.345, 'flooded', F80)).toBeCloseTo(0.625, 6);
	});

	it('holds at full above 12.65 V and at empty below 11.89 V', () => {
		expect(stateOfCharge(12.9, 'flooded', F80)).toBe(1);
		expect(stateOfCharge(11.5, 'flooded', F80)).toBe(0);
	});

	it('takes 0.024 V per 10 °F off the table below 80 °F', () => {
		// Battery makers' published correction: at 70 °F a 75 % battery rests at 12.45 − 0.024 V.
		expect(REST_VOLTS_PER_C * (F80 - F70)).toBeCloseTo(0.024, 9);
		expect(stateOfCharge(12.45 - 0.024, 'flooded', F70)).toBeCloseTo(0.75, 6);
		// …and adds it above: at 90 °F a full battery rests at 12.65 + 0.024 V.
		expect(stateOfChargeDetail(12.674, 'flooded', (90 - 32) * (5 / 9)).correctedVolts).toBeCloseTo(12.65, 6);
	});

	// One battery maker's AGM table (25 °C): 100 % 12.80–12.84 V, 75 % 12.55 V, 50 % 12.20 V, 25 % 11.75 V.
	it.each([
		[12.84, 1],
		[12.8, 1],
		[12.55, 0.75],
		[12.2, 0.5],
		[11.75, 0.25]
	])('reads an AGM battery at %f V and 25 °C as %f', (volts, soc) => {
		expect(stateOfCharge(volts, 'agm', 25)).toBeCloseTo(soc, 6);
	});

	it('says only "at most 25 %" for an AGM battery below the table (no discharged figure)', () => {
		const r = stateOfChargeDetail(11.4, 'agm', 25);
		expect(r.fraction).toBe(0.25);
		expect(r.atMost).toBe(true);
	});

	it('reads an EFB battery with the flooded table (common practice: EFB is a flooded design)', () => {
		expect(stateOfCharge(12.24, 'efb', F80)).toBeCloseTo(0.5, 6);
		expect(stateOfChargeDetail(12.24, 'efb', F80).table.source).toMatch(/flooded design/);
	});

	it('never leaves 0–1 and never falls as the voltage rises (property)', () => {
		fc.assert(
			fc.property(
				fc.double({ min: 10, max: 14, noNaN: true }),
				fc.double({ min: 0, max: 0.5, noNaN: true }),
				fc.constantFrom('flooded', 'agm', 'efb' as const),
				fc.double({ min: -30, max: 50, noNaN: true }),
				(v, dv, type, t) => {
					const a = stateOfCharge(v, type, t);
					const b = stateOfCharge(v + dv, type, t);
					return a >= 0 && a <= 1 && b >= a - 1e-12;
				}
			)
		);
	});
});

describe('load test minimum by temperature', () => {
	// Common practice (vehicle makers' service information): half the CCA for 15 s.
	it.each([
		[21, 9.6],
		[16, 9.5],
		[10, 9.4],
		[4, 9.3],
		[-1, 9.1],
		[-7, 8.9],
		[-12, 8.7],
		[-18, 8.5]
	])('at %f °C is %f V', (t, v) => {
		expect(loadTestMinimum(t)).toBeCloseTo(v, 9);
	});

	it('interpolates between points and holds at the ends', () => {
		expect(loadTestMinimum(18.5)).toBeCloseTo(9.55, 9);
		expect(loadTestMinimum(35)).toBe(9.6);
		expect(loadTestMinimum(-30)).toBe(8.5);
	});
});

describe('parasitic draw', () => {
	it('works out days to flat as usable Ah ÷ draw ÷ 24 (arithmetic)', () => {
		// 60 Ah, half usable, 50 mA: 30 Ah ÷ 0.05 A = 600 h = 25 days.
		expect(daysToFlat(60, 0.05, 0.5)).toBeCloseTo(25, 9);
		// 70 Ah, 60 % usable, 30 mA: 42 Ah ÷ 0.03 A = 1400 h ≈ 58.3 days.
		expect(daysToFlat(70, 0.03, 0.6)).toBeCloseTo(1400 / 24, 9);
	});

	it('answers never for no draw and refuses a usable share outside (0, 1]', () => {
		expect(daysToFlat(60, 0, 0.5)).toBe(Infinity);
		expect(() => daysToFlat(60, 0.05, 0)).toThrow(RangeError);
		expect(() => daysToFlat(60, 0.05, 1.2)).toThrow(RangeError);
	});
});

describe('voltage drop', () => {
	it('turns 2.0 V at 200 A into 0.010 Ω (Ohm’s law; a battery maker’s training example)', () => {
		expect(dropResistance(2.0, 200)).toBeCloseTo(0.01, 12);
	});

	it('refuses a current of zero', () => {
		expect(() => dropResistance(0.5, 0)).toThrow(RangeError);
	});

	it('allows 0.200 V per 100 A for a light-duty starting circuit (SAE J541)', () => {
		expect(j541DropLimit(100)).toBeCloseTo(0.2, 12);
		expect(j541DropLimit(250)).toBeCloseTo(0.5, 12);
		// Heavy duty: 0.10 V per 100 A (SAE J541).
		expect(j541DropLimit(300, 'heavy')).toBeCloseTo(0.3, 12);
	});
});

describe('cranking capability', () => {
	it('is the measured cranking current over the label rating of the same standard', () => {
		expect(crankingCapability(450, 600)).toBeCloseTo(0.75, 12);
		expect(() => crankingCapability(450, 0)).toThrow(RangeError);
	});
});
