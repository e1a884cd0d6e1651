/**
 * The capture screen's decisions. Coil figures: the demo coil's invented cold spec
 * 0.38–0.58 Ω; meter accuracy in the ±(% of reading + counts) form (its definition: one
 * count = the range's resolution), the two limits of error added (worst case, common practice).
 */
import { describe, expect, it } from 'vitest';
import {
	cellsFor,
	compareRows,
	hasFinerRange,
	leadsAge,
	pickRange,
	specText,
	startProblem,
	startUnit,
	unitsFor,
	viewReading,
	type FlowCheck,
	type TestMeter
} from '../../../src/lib/flow/capture';

const PRIMARY: FlowCheck = {
	key: 'primary',
	label: 'Primary winding',
	quantity: 'resistance',
	unit: 'Ω',
	openOk: false,
	condition: 'key_off',
	bands: [{ fromC: null, toC: 50, min: 0.38, max: 0.58 }]
};
const SECONDARY: FlowCheck = { ...PRIMARY, key: 'secondary', label: 'Secondary winding', unit: 'kΩ', bands: [{ fromC: null, toC: 50, min: 8800, max: 14600 }] };
const FEED: FlowCheck = { ...PRIMARY, key: 'feed', label: 'Feed voltage', quantity: 'voltage', unit: 'V', condition: 'key_on', bands: [{ fromC: null, toC: null, min: 11.5, max: 15 }] };
const LOOK: FlowCheck = { ...PRIMARY, key: 'case', label: 'Case', quantity: 'visual', unit: null, bands: [] };
const METER: TestMeter = {
	name: 'Example',
	ranges: [
		{ label: '200 Ω', resolution: 0.1, pctOfReading: 0.8, counts: 3, maxReading: 199.9 },
		{ label: '20 Ω (low-ohm)', resolution: 0.01, pctOfReading: 0.5, counts: 2, maxReading: 19.99 },
		{ label: '20 kΩ', resolution: 10, pctOfReading: 0.8, counts: 1, maxReading: 19990 },
		{ label: '20 V', quantity: 'voltage', resolution: 0.01, pctOfReading: 0.5, counts: 2, maxReading: 19.99 },
		{ label: '200 V', quantity: 'voltage', resolution: 0.1, pctOfReading: 0.5, counts: 2, maxReading: 199.9 }
	],
	leadResistance: 0.2,
	relativeMode: false,
	leadReadAt: '2026-12-02T08:00:00.000Z'
};
const COLD = { mode: 'measured' as const, tempC: 20 };
const cell = (check: FlowCheck, position = '1') => cellsFor([position], [check])[0];
const draft = (entry: string, rangeLabel: string, unit = 'Ω') => ({ entry, unit, samples: [], rangeLabel });

describe('the cells of a test', () => {
	const pack = [
		{ position: 'A', cylinders: [1, 4] },
		{ position: 'B', cylinders: [2, 3] }
	];
	it('asks each check at each cylinder, labelled with the cylinder', () => {
		expect(cellsFor(['1', '2'], [PRIMARY, SECONDARY]).map((c) => c.label)).toEqual([
			'Cylinder 1 · Primary winding',
			'Cylinder 1 · Secondary winding',
			'Cylinder 2 · Primary winding',
			'Cylinder 2 · Secondary winding'
		]);
	});
	it('asks a coil’s own checks once, under that coil: never “Coil B · Primary winding, coil A”', () => {
		const checks = [
			{ ...PRIMARY, key: 'primary_a', label: 'Primary winding, coil A', coil: 'A' },
			{ ...PRIMARY, key: 'primary_b', label: 'Primary winding, coil B', coil: 'B' },
			LOOK
		];
		expect(cellsFor(['A', 'B'], checks, pack).map((c) => c.label)).toEqual([
			'Coil A (cyl 1 & 4) · Primary winding, coil A',
			'Coil A (cyl 1 & 4) · Case',
			'Coil B (cyl 2 & 3) · Primary winding, coil B',
			'Coil B (cyl 2 & 3) · Case'
		]);
	});
	it('leaves spark checks to the spark test and keeps visual checks', () => {
		const spark = { ...PRIMARY, key: 'gap', quantity: 'spark', unit: 'mm' };
		expect(cellsFor(['1'], [LOOK, spark, PRIMARY]).map((c) => c.check.key)).toEqual(['case', 'primary']);
	});
});

describe('units and ranges', () => {
	it('offers Ω/kΩ for resistance, mV/V for voltage and voltage drop, mA/A for current', () => {
		expect(unitsFor(PRIMARY)).toEqual(['Ω', 'kΩ']);
		expect(unitsFor(FEED)).toEqual(['mV', 'V']);
		expect(unitsFor({ quantity: 'voltage_drop', unit: 'mV' })).toEqual(['mV', 'V']);
		expect(unitsFor({ quantity: 'current', unit: 'mA' })).toEqual(['mA', 'A']);
		expect(startUnit(SECONDARY)).toBe('kΩ');
	});
	it('starts a primary on the finest Ω range that resolves it, a secondary on 20 kΩ, a voltage on a volts range', () => {
		expect(pickRange(METER, PRIMARY)).toBe('20 Ω (low-ohm)');
		expect(pickRange(METER, SECONDARY)).toBe('20 kΩ');
		expect(pickRange(METER, FEED)).toBe('20 V');
	});
	it('knows whether a finer range exists', () => {
		expect(hasFinerRange(METER, PRIMARY, '200 Ω')).toBe(true);
		expect(hasFinerRange(METER, PRIMARY, '20 Ω (low-ohm)')).toBe(false);
	});
	it('shows a spec in its own unit', () => {
		expect(specText(FEED.bands[0], FEED)).toBe('Spec 11.5 V – 15 V');
		expect(specText(PRIMARY.bands[0], PRIMARY)).toBe('Cold spec 0.38 Ω – 0.58 Ω');
	});
});

describe('a reading as typed', () => {
	it('says “Can’t tell — re-zero the leads” for 0.15 Ω with 0.20 Ω leads, and does not let it be saved', () => {
		const v = viewReading(cell(PRIMARY), draft('0.15', '20 Ω (low-ohm)'), METER, COLD);
		expect(v.text).toBe('Can’t tell — re-zero the leads');
		expect(v.canSave).toBe(false);
		expect(v.advice).toMatch(/Read the leads again/);
	});
	it('says “over range” for OL on the 20 Ω range, and that it is not open', () => {
		const v = viewReading(cell(PRIMARY), draft('OL', '20 Ω (low-ohm)'), METER, COLD);
		expect(v.key).toBe('over_range');
		expect(v.text).toMatch(/over range/);
		expect(v.canSave).toBe(false);
	});
	it('says “Open circuit (OL)” for OL on the highest Ω range', () => {
		const v = viewReading(cell(SECONDARY), draft('OL', '20 kΩ', 'kΩ'), METER, COLD);
		expect(v.text).toBe('Open circuit (OL)');
		expect(v.canSave).toBe(true);
	});
	it('says 0.61 Ω with 0.20 Ω leads can’t be told from 0.38 Ω on the finest range, without sending to a lower one', () => {
		const v = viewReading(cell(PRIMARY), draft('0,61', '20 Ω (low-ohm)'), METER, COLD);
		expect(v.result!.u).toBeCloseTo(0.04405, 12);
		expect(v.text).toMatch(/^Can’t tell — too close to a limit for this meter/);
	});
	it('says what the sheet covers when no band applies at 110 °C', () => {
		const both = { ...PRIMARY, bands: [...PRIMARY.bands, { fromC: 50, toC: 100, min: 0.47, max: 0.68 }] };
		const v = viewReading(cell(both), draft('0,7', '20 Ω (low-ohm)'), METER, { mode: 'measured', tempC: 110 });
		expect(v.advice).toBe('No figure for 110 °C; the sheet covers below 50 °C and 50–100 °C.');
	});
	it('asks for another sample when one is far from the others, and leaves it out', () => {
		const d = { entry: '0,30', unit: 'Ω', samples: [{ value: 0.62, unit: 'Ω' }, { value: 0.63, unit: 'Ω' }], rangeLabel: '20 Ω (low-ohm)' };
		const v = viewReading(cell(PRIMARY), d, METER, COLD);
		expect(v.advice).toMatch(/take another sample/);
		expect(v.result!.value).toBeCloseTo(0.42, 12);
	});
	it('warns before any reading when the range cannot resolve the spec', () => {
		expect(viewReading(cell(PRIMARY), draft('', '200 Ω'), METER, COLD).rangeWarning).toMatch(/cannot tell/);
		expect(viewReading(cell(PRIMARY), draft('', '20 Ω (low-ohm)'), METER, COLD).rangeWarning).toBeNull();
	});
	it('takes a visual check’s OK or not OK', () => {
		const v = viewReading(cell(LOOK), { entry: '', unit: '', samples: [], rangeLabel: '', visual: { ok: false, note: 'cracked tower' } }, METER, COLD);
		expect(v.text).toBe('Not OK');
		expect(v.canSave).toBe(true);
	});
});

describe('the lead reading’s age', () => {
	const at = '2026-12-02T08:00:00.000Z';
	it.each([
		[10_000, 'just now'],
		[12 * 60_000, '12 min ago'],
		[3 * 3600_000, '3 h ago']
	])('after %d ms says %s', (ms, words) => {
		expect(leadsAge(at, Date.parse(at) + ms)).toBe(words);
	});
	it('says nothing when the leads were never read', () => {
		expect(leadsAge(null)).toBeNull();
	});
});

describe('starting a test', () => {
	const ok = { part: { sheet: {} }, refusal: null, leads: 0.2, temperature: COLD, relative: false, cautionNeedsTap: false, acknowledged: false };
	it('needs the leads read for this test', () => {
		expect(startProblem({ ...ok, leads: null })).toMatch(/read the leads/);
	});
	it('needs a temperature chosen: none is preselected', () => {
		expect(startProblem({ ...ok, temperature: null })).toMatch(/Choose the part’s temperature/);
	});
	it('starts when everything is there', () => {
		expect(startProblem(ok)).toBeNull();
	});
});

describe('the positions side by side', () => {
	it('flags the odd one of four by the median of the others, and leaves bad zeros out', () => {
		const saved = Object.fromEntries(
			(
				[
					['1', 0.62],
					['2', 0.63],
					['3', 0.95],
					['4', 0.61]
				] as const
			).map(([p, v]) => [`${p}|primary`, { id: p, data: { checkKey: 'primary', position: p, samples: [{ value: v, unit: 'Ω' }], rangeLabel: '20 Ω (low-ohm)' } }])
		);
		const [row] = compareRows([PRIMARY], ['1', '2', '3', '4'], saved, METER, COLD);
		expect(row.comparison).toEqual({ kind: 'odd', odd: ['3'] });
		expect(row.values['3'].key).toBe('high');
	});
});
