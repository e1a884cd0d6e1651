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
		['measured 110 °C, beyond every band', { mode: 'measured' as const, tempC: 110 }, []],
		['measured 50 °C, on the edge', { mode: 'measured' as const, tempC: 50 }, [50, 100]],
		['warm', { mode: 'warm' as const }, [50, 100]],
		['unknown', { mode: 'unknown' as const }, [50, 100]]
	])('%s gives the bands ending at %j', (_name, t, ends) => {
		expect(bandsFor(PRIMARY.bands, t).map((b) => b.toC)).toEqual(ends);
	});

	it('does not apply a sheet’s only band outside its temperatures (a hot spec to a cold part)', () => {
		const hotOnly = [{ fromC: 50, toC: 100, min: 0.45, max: 0.65 }];
		expect(bandsFor(hotOnly, { mode: 'overnight' })).toEqual([]);
		expect(bandsFor(hotOnly, { mode: 'just_run' })).toEqual(hotOnly);
	});

	it('applies a band for any temperature at every temperature', () => {
		const any = [{ fromC: null, toC: null, min: 9000, max: 15400 }];
		expect(bandsFor(any, { mode: 'measured', tempC: 130 })).toEqual(any);
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

	it('calls 0.15 Ω read with 0.20 Ω leads “can’t tell — re-zero the leads”, never under spec', () => {
		const r = evaluateReading(PRIMARY, [{ value: 0.15, unit: 'Ω' }], { ...FINE, leadResistance: 0.2 }, cold);
		expect(r.badZero).toBe(true);
		expect(r.verdict).toBe('bad_zero');
		expect(r.bands).toEqual([]);
		expect(r.value).toBe(0);
	});

	it('adds the lead reading’s error: 0.61 Ω with 0.20 Ω leads is 0.41 ± 0.044 Ω — can’t tell against 0.38 Ω', () => {
		// Meter accuracy form ±(0.5 % + 2 counts) at 0.01 Ω; worst-case sum of the two limits of
		// error (common practice): (0.00305 + 0.02) + (0.001 + 0.02) = 0.04405 Ω. The demo
		// coil's invented cold spec starts at 0.38 Ω: 0.41 − 0.044 = 0.366 straddles it.
		const demo: CheckSpec = { ...PRIMARY, bands: [{ fromC: null, toC: 50, min: 0.38, max: 0.58 }] };
		const r = evaluateReading(demo, [{ value: 0.61, unit: 'Ω' }], { ...FINE, leadResistance: 0.2 }, cold);
		expect(r.value).toBeCloseTo(0.41, 12);
		expect(r.u).toBeCloseTo(0.04405, 12);
		expect(r.verdict).toBe('borderline');
	});

	it('carries the zeroing reading’s error in relative mode the same way', () => {
		// The meter zeroed on 0.20 Ω and shows 0.41 Ω: it read 0.61 Ω, so the ± is the same 0.04405.
		const rel = { ...FINE, relativeMode: true, zeroReading: 0.2 };
		const r = evaluateReading(PRIMARY, [{ value: 0.41, unit: 'Ω' }], rel, cold);
		expect(r.value).toBeCloseTo(0.41, 12);
		expect(r.u).toBeCloseTo(0.04405, 12);
	});

	it('leaves a far sample out of the value: 0.62 / 0.63 / 0.30 with 0.20 Ω leads settles on 0.62 − 0.20', () => {
		const r = evaluateReading(PRIMARY, [0.62, 0.63, 0.3].map((value) => ({ value, unit: 'Ω' })), { ...FINE, leadResistance: 0.2 }, cold);
		expect(r.suspects).toEqual([2]);
		expect(r.value).toBeCloseTo(0.42, 12);
		expect(r.verdict).toBe('within');
	});

	it('settles voltage on the median, not the lowest, and judges it in volts', () => {
		const feed: CheckSpec = { key: 'feed', quantity: 'voltage', unit: 'V', openOk: false, bands: [{ fromC: null, toC: null, min: 11.5, max: 15 }] };
		const volts = { resolution: 0.01, pctOfReading: 0.5, counts: 2, leadResistance: 0.2, relativeMode: false };
		const r = evaluateReading(feed, [12.1, 12.6, 12.5].map((value) => ({ value, unit: 'V' })), volts, cold);
		expect(r).toMatchObject({ settleMode: 'median', value: 12.5, verdict: 'within' });
		// The leads are not taken off a voltage: 12.5 V at ±(0.5 % + 2) → 0.0625 + 0.02.
		expect(r.u).toBeCloseTo(0.0825, 12);
	});

	it('reads millivolts of a voltage drop in volts', () => {
		const drop: CheckSpec = { key: 'earth', quantity: 'voltage_drop', unit: 'mV', openOk: false, bands: [{ fromC: null, toC: null, min: null, max: 0.5 }] };
		const mv = { resolution: 0.0001, pctOfReading: 0.5, counts: 2, leadResistance: 0, relativeMode: false };
		const r = evaluateReading(drop, [{ value: 620, unit: 'mV' }], mv, cold);
		expect(r.value).toBeCloseTo(0.62, 12);
		expect(r.verdict).toBe('high');
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

	it('judges OL on the meter’s highest range high (an open circuit) unless the check accepts open', () => {
		const top = { ...FINE, highest: true };
		expect(evaluateReading(PRIMARY, [{ value: 'OL', unit: 'Ω' }], top, cold).verdict).toBe('high');
		expect(evaluateReading({ ...PRIMARY, openOk: true }, [{ value: 'OL', unit: 'Ω' }], top, cold).verdict).toBe('within');
	});

	it('calls OL on a range that is not the highest “over range”, unless the sheet accepts open', () => {
		const low = { ...FINE, highest: false };
		expect(evaluateReading(PRIMARY, [{ value: 'OL', unit: 'Ω' }], low, cold).verdict).toBe('over_range');
		expect(evaluateReading({ ...PRIMARY, openOk: true }, [{ value: 'OL', unit: 'Ω' }], low, cold).verdict).toBe('within');
	});

	it('has no verdict without a spec or without samples', () => {
		expect(evaluateReading({ ...PRIMARY, bands: [] }, [{ value: 1, unit: 'Ω' }], FINE, cold).verdict).toBe('no_spec');
		expect(evaluateReading(PRIMARY, [], FINE, cold).value).toBeNull();
	});

	it('has no verdict at 110 °C with a cold and a hot spec up to 100 °C', () => {
		expect(evaluateReading(PRIMARY, [{ value: 0.5, unit: 'Ω' }], FINE, { mode: 'measured', tempC: 110 }).verdict).toBe('no_spec');
	});

	it('takes a visual check’s finding: OK or not OK', () => {
		const look: CheckSpec = { key: 'boot', quantity: 'visual', unit: null, openOk: false, bands: [] };
		expect(evaluateReading(look, [], FINE, cold, { ok: true }).verdict).toBe('within');
		expect(evaluateReading(look, [], FINE, cold, { ok: false, note: 'Tracking on the boot' }).verdict).toBe('not_ok');
		expect(evaluateReading(look, [], FINE, cold).verdict).toBe('no_spec');
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
		expect(meterFor(meter, '20 kΩ')).toEqual({
			resolution: 10,
			pctOfReading: 0.8,
			counts: 1,
			leadResistance: 0.2,
			relativeMode: false,
			leadRange: { resolution: 0.1, pctOfReading: 0.8, counts: 3 },
			highest: true,
			quantity: 'resistance'
		});
		expect(meterFor(meter, 'nope').resolution).toBe(0.1);
	});

	it('knows the 200 Ω range is not the highest: OL there is over range', () => {
		expect(meterFor(meter, '200 Ω').highest).toBe(false);
	});

	it('picks a range of the check’s quantity and finds the highest among those alone', () => {
		const mixed = {
			...meter,
			ranges: [
				...meter.ranges,
				{ label: '20 V', resolution: 0.01, pctOfReading: 0.5, counts: 2, maxReading: 19.99, quantity: 'voltage' as const },
				{ label: '200 V', resolution: 0.1, pctOfReading: 0.5, counts: 2, maxReading: 199.9, quantity: 'voltage' as const }
			]
		};
		expect(meterFor(mixed, null, 'voltage')).toMatchObject({ resolution: 0.01, highest: false, quantity: 'voltage' });
		expect(meterFor(mixed, '200 V')).toMatchObject({ highest: true, quantity: 'voltage' });
		// The leads were read on the finest Ω range, whatever the reading's range.
		expect(meterFor(mixed, '200 V').leadRange).toEqual({ resolution: 0.1, pctOfReading: 0.8, counts: 3 });
	});
});

describe('comparing the phone’s and the server’s result', () => {
	it('treats equal verdicts and values within 1e-9 as the same, and anything else as a mismatch', () => {
		expect(sameResult({ value: 0.42, verdict: 'within' }, { value: 0.42 + 1e-12, verdict: 'within' })).toBe(true);
		expect(sameResult({ value: 0.42, verdict: 'within' }, { value: 0.42, verdict: 'high' })).toBe(false);
		expect(sameResult({ value: 0.42, verdict: 'within' }, { value: 0.43, verdict: 'within' })).toBe(false);
	});

	it('treats the phone’s OL (null with ol) as the server’s Infinity', () => {
		expect(sameResult({ value: null, verdict: 'high', ol: true }, { value: Infinity, verdict: 'high' })).toBe(true);
		expect(sameResult({ value: null, verdict: 'high' }, { value: Infinity, verdict: 'high' })).toBe(false);
	});
});
