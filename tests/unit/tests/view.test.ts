import { describe, expect, it } from 'vitest';
import { evaluateReading, meterFor, type TemperatureSnapshot } from '../../../src/lib/flow/reading';
import { buildJobTests, type SheetChecks } from '../../../src/lib/tests/view';

// An invented coil: primary winding, cold spec (below 50 °C) 0.36–0.55 Ω, hot spec
// (50–100 °C) 0.45–0.65 Ω — common practice for the shape, figures invented.
const SHEET: SheetChecks = {
	id: 'sheet-1',
	sheetVersion: 3,
	checks: [
		{
			key: 'primary',
			label: 'Primary winding',
			quantity: 'resistance',
			unit: 'Ω',
			openOk: false,
			from: '1',
			to: '2',
			bands: [
				{ fromC: null, toC: 50, min: 0.36, max: 0.55 },
				{ fromC: 50, toC: 100, min: 0.45, max: 0.65 }
			]
		}
	]
};
const METER = {
	name: 'Bench meter',
	ranges: [{ label: '200 Ω', resolution: 0.01, pctOfReading: 0.5, counts: 2 }],
	leadResistance: 0.1,
	relativeMode: false
};
const TEMP: TemperatureSnapshot = { mode: 'measured', tempC: 20 };
const test = {
	id: 't1',
	jobId: 'j1',
	sheetId: 'sheet-1',
	sheetVersion: 3,
	partNumber: 'ZX-CP-7710',
	position: '1,2,3,4',
	technicianId: 'u1',
	meter: METER,
	temperature: TEMP,
	state: 'done',
	createdAt: '2026-12-01T09:00:00.000Z'
};

/** A reading as the feed carries it, with the workshop's result computed as the server does. */
function reading(id: string, position: string, raw: number, phone?: object) {
	const samples = [{ value: raw, unit: 'Ω' }];
	const server = evaluateReading(SHEET.checks[0], samples, meterFor(METER, '200 Ω'), TEMP);
	return {
		id,
		testId: 't1',
		checkKey: 'primary',
		position,
		samples,
		rangeLabel: '200 Ω',
		deviceResult: phone ?? { value: server.value, verdict: server.verdict },
		serverResult: server,
		mismatch: Boolean(phone),
		rangeUnresolved: false,
		createdAt: `2026-12-01T09:0${position}:00.000Z`
	};
}

const people = new Map([['u1', { name: 'Sanna Velloway', role: 'technician' as const }]]);

describe('a job’s tests as the pages show them', () => {
	const view = buildJobTests({
		tests: [test],
		readings: [
			reading('r1', '1', 0.57), // 0.57 − 0.10 leads = 0.47 Ω ± 0.043 Ω: inside 0.36–0.55 (the reading's and the leads' limits of error added)
			reading('r2', '2', 0.6, { value: 0.6, verdict: 'high' }), // the phone forgot the leads
			reading('r3', '3', 0.95), // 0.85 Ω: over spec
			reading('r4', '4', 0.61) // 0.51 Ω
		],
		sparks: [
			{
				id: 's1',
				jobId: 'j1',
				position: '3',
				gapMm: 7,
				outcome: 'weak',
				createdBy: 'u1',
				createdAt: '2026-12-01T10:00:00.000Z'
			}
		],
		swaps: [
			{
				id: 'w1',
				jobId: 'j1',
				fromPosition: '3',
				toPosition: '1',
				beforeCounts: { '3': 5 },
				afterCounts: { '1': 4 },
				conclusion: 'fault_followed',
				createdBy: 'u1'
			}
		],
		sheets: [SHEET],
		people,
		locale: 'en-GB'
	});
	const t = view.tests[0];

	it('says what was tested, by whom, on which meter, at what temperature and against which spec', () => {
		expect(t).toMatchObject({
			partNumber: 'ZX-CP-7710',
			sheetVersion: 3,
			stateText: 'Finished',
			technician: 'Sanna Velloway (Technician)',
			positions: ['1', '2', '3', '4']
		});
		expect(t.meter).toEqual({
			name: 'Bench meter',
			leads: 'Lead zero 0.1 Ω, taken off each reading',
			ranges: ['200 Ω']
		});
		expect(t.temperature).toBe('Measured 20 °C');
		expect(t.specsChosen).toEqual(['Cold spec · below 50 °C']);
		expect(t.checks[0].specs).toEqual(['Cold spec · below 50 °C: 0.36 Ω to 0.55 Ω']);
		expect(t.checks[0].terminals).toBe('between 1 and 2');
	});

	it('lists every reading with its samples and the phone’s result beside the workshop’s', () => {
		const [r1, r2, r3] = t.checks[0].readings;
		expect(t.checks[0].readings).toHaveLength(4);
		expect(r1).toMatchObject({
			position: '1',
			rangeLabel: '200 Ω',
			samples: ['0.57 Ω'],
			differ: false
		});
		expect(r1.phone).toMatchObject({ key: 'within', text: '0.47 Ω' });
		expect(r1.workshop).toMatchObject({ key: 'within', text: '0.47 Ω' });
		expect(r2.phone).toMatchObject({ key: 'high', text: '0.6 Ω' });
		expect(r2.workshop).toMatchObject({ key: 'within', text: '0.5 Ω' });
		expect(r2.differ).toBe(true);
		expect(r3.workshop?.key).toBe('high');
		expect(t.mismatches).toBe(1);
	});

	it('compares the cylinders on the workshop’s values and names the odd one out', () => {
		// 0.47, 0.50, 0.85 and 0.51 Ω: cylinder 3 is more than 10 % from the median of the
		// others, 0.51 Ω (the odd-one-out rule of DESIGN §4; 10 % is common practice).
		expect(t.checks[0].comparison).toEqual({ kind: 'odd', odd: ['3'] });
		expect(t.checks[0].byPosition['3']).toMatchObject({ verdict: 'high' });
	});

	it('lists the job’s spark and swap tests in words', () => {
		expect(view.sparks[0]).toMatchObject({
			position: '3',
			gap: '7 mm',
			outcomeText: 'Weak spark',
			by: 'Sanna Velloway (Technician)'
		});
		expect(view.swaps[0]).toMatchObject({
			from: '3',
			to: '1',
			before: 'cyl 3: 5',
			after: 'cyl 1: 4'
		});
		expect(view.swaps[0].conclusion).toContain('followed the coil');
	});

	it('shows a reading not sent yet without a workshop result, and decimal commas where the phone uses them', () => {
		const local = buildJobTests({
			tests: [
				{
					...test,
					technicianId: undefined,
					meter: { ...METER, relativeMode: true, leadResistance: 0 }
				}
			],
			readings: [
				{
					id: 'r9',
					testId: 't1',
					checkKey: 'primary',
					position: '1',
					samples: [
						{ value: 0.5, unit: 'Ω' },
						{ value: 'OL', unit: 'Ω' }
					],
					deviceResult: { value: 0.5, verdict: 'within' }
				}
			],
			sparks: [],
			swaps: [],
			sheets: [SHEET],
			people,
			locale: 'de-DE'
		}).tests[0];
		const r = local.checks[0].readings[0];
		expect(r.workshop).toBeNull();
		expect(r.samples).toEqual(['0,5 Ω', 'OL']);
		expect(local.meter?.leads).toBe('Relative mode: the meter takes the leads off');
		expect(local.technician).toBe('Someone not on this phone');
	});
});
