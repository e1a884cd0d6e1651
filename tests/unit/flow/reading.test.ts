/**
 * The flow's judgement of one reading. Spec figures: an ignition coil's cold spec (below
 * 50 °C) 0.36–0.55 Ω primary, hot spec (50–100 °C) 0.45–0.65 Ω — common practice, no
 * published source. Meter accuracy in the ±(% of reading + counts) form, with one count =
 * the range's resolution (the definition of that form).
 */
import { describe, expect, it } from 'vitest';
import { bandsFor, evaluateReading, meterFor, sameResult, type CheckSpec } from '../../../src/lib/flow/reading';

const PRIMARY: CheckSpec = {
	key: 'primary',
	quantity: 'resistance',
	unit: 'Ω',
	openOk: false,
	bands: [
		{ fromC: null, toC: 50, min: 0.36, max: 0.55 },
		{ fromC: 50, toC: 100, min: 0.45, max: 0.65 }
	]
};
const FINE = { resolution: 0.01, pctOfReading: 0.5, counts: 2, leadResistance: 0, relativeMode: false };
const cold = { mode: 'measured' as const, tempC: 20 };

describe('which spec applies', () => {
	it.each([
		['stood overnight', { mode: 'overnight' as const }, [50]],
		['just run', { mode: 'just_run' as const }, [100]],
		['measured 20 °C', { mode: 'measured' as const, tempC: 20 }, [50]],
		['measured 75 °C', { mode: 'measured' as const, tempC: 75 }, [100]],
		['measured 47 °C, within 5 °C of the edge', { mode: 'measured' as const, tempC: 47 }, [50, 100]],
		['measured 50 °C, on the edge', { mode: 'measured' as const, tempC: 50 }, [50, 100]],
		['warm', { mode: 'warm' as const }, [50, 100]],
		['unknown', { mode: 'unknown' as const }, [50, 100]]
	])('%s gives the bands ending at %j', (_name, t, ends) => {
		expect(bandsFor(PRIMARY.bands, t).map((b) => b.toC)).toEqual(ends);
	});
});

describe('a reading judged', () => {
	it('calls 0.40 Ω cold OK (common practice figures)', () => {
		const r = evaluateReading(PRIMARY, [{ value: 0.4, unit: 'Ω' }], FINE, cold);
		expect(r.verdict).toBe('within');
		expect(r.value).toBeCloseTo(0.4, 12);
	});

	it('takes the lowest sample below 10 Ω and the median above', () => {
		const low = evaluateReading(PRIMARY, [0.47, 0.42, 0.44].map((value) => ({ value, unit: 'Ω' })), FINE, cold);
		expect(low).toMatchObject({ settleMode: 'lowest', value: 0.42 });
		const sec: CheckSpec = { ...PRIMARY, key: 'secondary', unit: 'kΩ', bands: [{ fromC: null, toC: null, min: 9000, max: 15400 }] };
		const high = evaluateReading(sec, [12.1, 12.5, 12.3].map((value) => ({ value, unit: 'kΩ' })), { ...FINE, resolution: 10 }, cold);
		expect(high.settleMode).toBe('median');
		expect(high.value).toBeCloseTo(12300, 9);
	});

	it('subtracts the leads (0.62 − 0.20 = 0.42 Ω) unless the meter is in relative mode', () => {
		const sub = evaluateReading(PRIMARY, [{ value: 0.62, unit: 'Ω' }], { ...FINE, leadResistance: 0.2 }, cold);
		expect(sub.value).toBeCloseTo(0.42, 12);
		const rel = evaluateReading(PRIMARY, [{ value: 0.62, unit: 'Ω' }], { ...FINE, leadResistance: 0.2, relativeMode: true }, cold);
		expect(rel.value).toBeCloseTo(0.62, 12);
		expect(rel.verdict).toBe('high');
	});

	it('flags a bad zero when the reading is below the leads, and never goes below zero', () => {
		const r = evaluateReading(PRIMARY, [{ value: 0.15, unit: 'Ω' }], { ...FINE, leadResistance: 0.2 }, cold);
		expect(r.badZero).toBe(true);
		expect(r.value).toBe(0);
	});

	it('says "depends" when the cold and hot specs disagree near the edge', () => {
		// 0.60 Ω: over the cold spec (max 0.55), inside the hot spec (0.45–0.65).
		const r = evaluateReading(PRIMARY, [{ value: 0.6, unit: 'Ω' }], FINE, { mode: 'measured', tempC: 48 });
		expect(r.bands.map((b) => b.verdict)).toEqual(['high', 'within']);
		expect(r.verdict).toBe('depends');
	});

	it('gives one verdict near the edge when both specs agree', () => {
		const r = evaluateReading(PRIMARY, [{ value: 0.5, unit: 'Ω' }], FINE, { mode: 'unknown' });
		expect(r.verdict).toBe('within');
	});

	it('calls 0.30 Ω cold on a 0.1 Ω range with ±(0.5 % + 2 counts) borderline, and low on a 0.01 Ω range', () => {
		const coarse = evaluateReading(PRIMARY, [{ value: 0.3, unit: 'Ω' }], { ...FINE, resolution: 0.1 }, cold);
		expect(coarse.u).toBeCloseTo(0.0015 + 0.2, 12);
		expect(coarse.verdict).toBe('borderline');
		expect(evaluateReading(PRIMARY, [{ value: 0.3, unit: 'Ω' }], FINE, cold).verdict).toBe('low');
	});

	it('judges OL high unless the check accepts an open circuit', () => {
		expect(evaluateReading(PRIMARY, [{ value: 'OL', unit: 'Ω' }], FINE, cold).verdict).toBe('high');
		expect(evaluateReading({ ...PRIMARY, openOk: true }, [{ value: 'OL', unit: 'Ω' }], FINE, cold).verdict).toBe('within');
	});

	it('has no verdict without a spec or without samples', () => {
		expect(evaluateReading({ ...PRIMARY, bands: [] }, [{ value: 1, unit: 'Ω' }], FINE, cold).verdict).toBe('no_spec');
		expect(evaluateReading(PRIMARY, [], FINE, cold).value).toBeNull();
	});
});

describe('the meter for one reading', () => {
	const meter = {
		ranges: [
			{ label: '200 Ω', resolution: 0.1, pctOfReading: 0.8, counts: 3, maxReading: 199.9 },
			{ label: '20 kΩ', resolution: 10, pctOfReading: 0.8, counts: 1, maxReading: null }
		],
		leadResistance: 0.2,
		relativeMode: false
	};
	it('takes the named range, else the first, with the test’s leads', () => {
		expect(meterFor(meter, '20 kΩ')).toEqual({ label: '20 kΩ', resolution: 10, pctOfReading: 0.8, counts: 1, leadResistance: 0.2, relativeMode: false });
		expect(meterFor(meter, 'nope').resolution).toBe(0.1);
	});
});

describe('comparing the phone’s and the server’s result', () => {
	it('treats equal verdicts and values within 1e-9 as the same, and anything else as a mismatch', () => {
		expect(sameResult({ value: 0.42, verdict: 'within' }, { value: 0.42 + 1e-12, verdict: 'within' })).toBe(true);
		expect(sameResult({ value: 0.42, verdict: 'within' }, { value: 0.42, verdict: 'high' })).toBe(false);
		expect(sameResult({ value: 0.42, verdict: 'within' }, { value: 0.43, verdict: 'within' })).toBe(false);
	});
});
