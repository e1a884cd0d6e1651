/** The meters form: ranges as an accuracy table states them, problems said in plain words. */
import { describe, expect, it } from 'vitest';
import { blankRow, parseRows, toRows } from '../../../src/routes/(app)/field/meters/meter-form';

describe('the meters form', () => {
	it('reads a 20 V range at ±(0.5 % + 2) with 0.01 V resolution in volts, and a 200 mV one in millivolts', () => {
		const { meters, errors } = parseRows([
			{
				name: 'Mine',
				rows: [
					{ label: '20 V', quantity: 'voltage', resolution: '0,01', unit: 'V', pct: '0,5', counts: '2', max: '19,99' },
					{ label: '200 mV', quantity: 'voltage', resolution: '0,1', unit: 'mV', pct: '0,5', counts: '2', max: '199,9' }
				]
			}
		]);
		expect(errors).toEqual({});
		expect(meters![0].ranges[0]).toEqual({ label: '20 V', quantity: 'voltage', resolution: 0.01, pctOfReading: 0.5, counts: 2, maxReading: 19.99 });
		expect(meters![0].ranges[1].resolution).toBeCloseTo(0.0001, 15);
		expect(meters![0].ranges[1].maxReading).toBeCloseTo(0.1999, 15);
	});

	it('says each problem in words beside its field, never the schema’s field name', () => {
		const { meters, errors } = parseRows([{ name: '', rows: [{ ...blankRow(), label: '20 Ω', resolution: 'x', pct: '', counts: '1,5' }] }]);
		expect(meters).toBeNull();
		expect(errors).toEqual({
			'0.0.resolution': 'Enter the resolution as a number, e.g. 0,01',
			'0.0.pct': 'Enter the % of reading as a number, e.g. 0,5',
			'0.0.counts': 'The counts are a whole number'
		});
		for (const m of Object.values(errors)) expect(m).not.toMatch(/pctOfReading|resolution:|maxReading|expected/);
	});

	it('shows saved ranges back in a readable unit: 10 Ω resolution as 0,01 kΩ, 0.0001 V as 0,1 mV', () => {
		const rows = toRows({
			name: 'Mine',
			ranges: [
				{ label: '20 kΩ', quantity: 'resistance', resolution: 10, pctOfReading: 0.8, counts: 1, maxReading: 19990 },
				{ label: '200 mV', quantity: 'voltage', resolution: 0.0001, pctOfReading: 0.5, counts: 2, maxReading: 0.1999 }
			]
		}).rows;
		expect(rows.map((r) => [r.resolution, r.unit, r.max])).toEqual([
			['0.01', 'kΩ', '19.99'],
			['0.1', 'mV', '199.9']
		]);
	});

	it('takes a range saved before ranges had a quantity as an ohms range', () => {
		const rows = toRows({ name: 'Old', ranges: [{ label: '200 Ω', resolution: 0.1, pctOfReading: 0.8, counts: 3 } as never] }).rows;
		expect(rows[0].quantity).toBe('resistance');
	});
});
