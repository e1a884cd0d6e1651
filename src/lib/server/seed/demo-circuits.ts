/**
 * The demo's no-start job: the Brisel would not start after a week at the airport. Its
 * invented battery, alternator, starter relay and crank sensor with their sheets, and a
 * battery test and a parasitic draw already done on the technician's phone, pushed through
 * the sync path so that the server judges them. Every part number, figure and sheet here is
 * invented for the demo.
 */
import type { SessionUser } from '../auth/types';
import { pushOps } from '../sync/push';

const ID = (n: number) => `019a0000-0000-7000-8000-${String(n).padStart(12, '0')}`;
const BRISEL = [{ make: 'Corvane', model: 'Brisel', yearFrom: 2017, yearTo: 2022, engineCode: 'CV16T' }];
const band = (min: number | null, max: number | null) => [{ fromC: null, toC: null, min, max }];
const source = (section: string) => ({ document: 'Tallow Bridge demo data sheet (invented)', section, page: '1' });

export const NO_START_JOB = {
	id: ID(304),
	number: 1004,
	customerId: ID(101),
	vehicleId: ID(201),
	complaint: 'No start after a week parked: cranks slowly, then only clicks.',
	location: 'Workshop bay 3',
	codesBefore: [{ code: 'P0335', text: 'Crank position sensor circuit' }]
};

export const NO_START_PARTS = [
	{ id: ID(404), partNumber: 'TB-SB-0070', kind: 'battery', description: 'Starter battery, EFB, 70 Ah, 680 A EN (demo part, invented)', fitment: BRISEL, cautions: [], positions: [] },
	{ id: ID(405), partNumber: 'TB-SG-1403', kind: 'alternator', description: 'Alternator, 140 A (demo part, invented figures)', fitment: BRISEL, cautions: ['hot_surface'], positions: [] },
	{ id: ID(406), partNumber: 'TB-SR-0485', kind: 'relay', description: 'Starter relay, 12 V mini (demo part, invented figures)', fitment: BRISEL, cautions: [], positions: [] },
	{ id: ID(407), partNumber: 'TB-SK-0812', kind: 'crank_cam_sensor', description: 'Crank sensor, inductive (demo part, invented figures)', fitment: BRISEL, cautions: [], positions: [] }
];

/** Sheets of the no-start parts; check keys are those `flow/circuit.ts` reads limits from. */
export const NO_START_SHEETS = [
	{
		id: ID(503),
		componentId: ID(404),
		source: source('B1'),
		checks: [{ key: 'case', label: 'Case, posts and vents: cracks, leaks, corrosion', quantity: 'visual', from: null, to: null, condition: 'key_off', rangeHint: null, unit: null, openOk: false, bands: [] }]
	},
	{
		id: ID(504),
		componentId: ID(405),
		source: source('A2'),
		checks: [
			{ key: 'regulated', label: 'Regulated voltage at idle', quantity: 'voltage', from: 'B+', to: 'battery −', condition: 'idle', rangeHint: '20 V', unit: 'V', openOk: false, bands: band(13.7, 14.7) },
			{ key: 'ripple', label: 'AC ripple at idle', quantity: 'voltage', from: 'B+', to: 'battery −', condition: 'idle', rangeHint: '2 V AC', unit: 'V', openOk: false, bands: band(0, 0.4) }
		]
	},
	{
		id: ID(505),
		componentId: ID(406),
		source: source('R1'),
		checks: [
			{ key: 'coil', label: 'Coil, pins 85–86', quantity: 'resistance', from: '85', to: '86', condition: 'key_off', rangeHint: '200 Ω', unit: 'Ω', openOk: false, bands: band(72, 96) },
			{ key: 'contacts', label: 'Closed contacts, pins 30–87', quantity: 'voltage_drop', from: '30', to: '87', condition: 'under_load', rangeHint: '2 V', unit: 'V', openOk: false, bands: band(0, 0.15) }
		]
	},
	{
		id: ID(506),
		componentId: ID(407),
		source: source('S4'),
		checks: [
			{ key: 'winding', label: 'Winding, pins 1–2', quantity: 'resistance', from: '1', to: '2', condition: 'key_off', rangeHint: '2 kΩ', unit: 'Ω', openOk: false, bands: band(560, 840) },
			{ key: 'ac_output', label: 'AC output while cranking', quantity: 'voltage', from: '1', to: '2', condition: 'cranking', rangeHint: '20 V AC', unit: 'V', openOk: false, bands: band(0.6, null) }
		]
	}
];

export const NO_START_BATTERY_TEST = ID(801);

/** The battery test (flat: charge and re-test) and the parasitic draw found on the job. */
export async function seedNoStartTests(tech: SessionUser) {
	const time = '2026-12-02T08:40:00.000Z';
	const op = (n: number, kind: string, inputs: Record<string, unknown>) => ({
		opId: ID(900 + n),
		entity: 'circuit_test',
		entityId: ID(801 + n),
		kind: 'create' as const,
		baseVersion: 0,
		fields: { jobId: NO_START_JOB.id, kind, inputs },
		deviceTime: time
	});
	const ops = [
		op(0, 'battery', { partNumber: 'TB-SB-0070', batteryType: 'efb', standard: 'en_50342_1', ratedA: 680, tempC: 8, surfaceGone: true, restV: 12.08, method: 'conductance', measuredA: 310, minCapability: 75 }),
		op(1, 'parasitic', { capacityAh: 70, waitMin: 45, waitStartedAt: '2026-12-02T07:50:00.000Z', drawMa: 240, limitMa: 50, usablePct: 50, fuses: [{ fuse: 'F14', mv: 0.3 }, { fuse: 'F31', mv: 6.8 }, { fuse: 'F9', mv: 0.9 }] })
	];
	return pushOps(tech, { deviceId: 'seed', ops } as never);
}
