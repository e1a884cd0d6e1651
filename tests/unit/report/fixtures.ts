/**
 * Report facts for the unit tests: an invented workshop, customer, vehicle and part. The coil
 * figures are the demo sheet's invented ones (demo only); each reading is judged here by the
 * same function the server uses (flow/reading.ts), so the verdicts are not typed in by hand.
 */
import { evaluateReading, meterFor, type CheckSpec } from '../../../src/lib/flow/reading';
import type { ReadingFacts, ReportFacts } from '../../../src/lib/report/types';

export const PRIMARY: CheckSpec & { label: string } = {
	key: 'primary',
	label: 'Primary winding',
	quantity: 'resistance',
	unit: 'Ω',
	openOk: false,
	bands: [
		{ fromC: null, toC: 50, min: 0.38, max: 0.58 },
		{ fromC: 50, toC: 100, min: 0.47, max: 0.68 }
	]
};
export const SECONDARY: CheckSpec & { label: string } = {
	key: 'secondary',
	label: 'Secondary winding',
	quantity: 'resistance',
	unit: 'kΩ',
	openOk: false,
	bands: [
		{ fromC: null, toC: 50, min: 8800, max: 14600 },
		{ fromC: 50, toC: 100, min: 11000, max: 17400 }
	]
};

const COLD = { mode: 'measured' as const, tempC: 20 };

/** A reading judged as the server judges it, on a range fine enough for the check (0.01 Ω or 10 Ω). */
export function reading(check: CheckSpec, position: string, value: number | 'OL', unit: string): ReadingFacts {
	const resolution = check.unit === 'kΩ' ? 10 : 0.01;
	const meter = meterFor({ ranges: [{ label: 'range', resolution, pctOfReading: 0.8, counts: 3 }], leadResistance: 0, relativeMode: true });
	const r = evaluateReading(check, [{ value, unit }], meter, COLD);
	return { position, checkKey: check.key, value: r.value, verdict: r.verdict, bands: r.bands };
}

export function facts(over: Partial<ReportFacts> = {}): ReportFacts {
	return {
		jobNumber: 1042,
		complaint: 'Misfire at idle, worse when cold.',
		codesBefore: [{ code: 'P0303', text: 'Cylinder 3 misfire detected' }],
		codesAfter: [],
		customerName: 'Orla Brindle',
		vehicle: { make: 'Corvane', model: 'Brisel', year: 2019, plate: 'TB24 KQL', vin: null, odometer: 84210, odometerUnit: 'km' },
		workshop: { name: 'Harrow Lane Auto Electrics', address: '3 Harrow Lane, Millbrook', phone: '0100 555 0199', email: 'desk@harrowlane.example' },
		technicians: ['Sanna Velloway'],
		tests: [
			{
				partNumber: 'TB-IC-2041',
				kind: 'ignition_coil',
				positions: ['1', '2', '3'].map((position) => ({ position, cylinders: null })),
				temperature: COLD,
				checks: [PRIMARY, SECONDARY],
				readings: [
					reading(PRIMARY, '1', 0.5, 'Ω'),
					reading(SECONDARY, '1', 12.1, 'kΩ'),
					reading(PRIMARY, '2', 0.49, 'Ω'),
					reading(SECONDARY, '2', 11.9, 'kΩ'),
					reading(PRIMARY, '3', 0.51, 'Ω'),
					reading(SECONDARY, '3', 19.2, 'kΩ')
				]
			}
		],
		sparks: [],
		swaps: [],
		workDone: null,
		recommendations: [],
		photos: [],
		date: '2026-12-02',
		...over
	};
}
