/**
 * The demo's first job as tested by the technician's phone: the pencil coils of cylinders
 * 1–4 measured cold, cylinder 3's secondary winding well over spec. Pushed through the same
 * sync path a phone uses, so the server judges every reading. Invented figures (demo only).
 */
import type { SessionUser } from '../auth/types';
import { pushOps } from '../sync/push';

const ID = (n: number) => `019a0000-0000-7000-8000-${String(n).padStart(12, '0')}`;
export const DEMO_TEST_ID = ID(601);

/** Primary (Ω) and secondary (kΩ) readings per cylinder. */
const READINGS: [string, number, number][] = [
	['1', 0.49, 12.1],
	['2', 0.51, 11.8],
	['3', 0.5, 19.6],
	['4', 0.52, 12.3]
];

/** Push the demo test and its readings as the technician (`tech`) on job `jobId`. */
export async function seedDemoTest(tech: SessionUser, ids: { jobId: string; componentId: string; sheetId: string }) {
	const time = '2026-12-01T09:30:00.000Z';
	let n = 610;
	const op = (entity: string, entityId: string, fields: Record<string, unknown>) => ({
		opId: ID(700 + (n - 610)),
		entity,
		entityId,
		kind: 'create' as const,
		baseVersion: 0,
		fields,
		deviceTime: time
	});
	const ops = [
		op('test', DEMO_TEST_ID, {
			jobId: ids.jobId,
			componentId: ids.componentId,
			sheetId: ids.sheetId,
			partNumber: 'TB-IC-2041',
			position: '1,2,3,4',
			meter: {
				name: 'Bench meter',
				ranges: [
					{ label: '200 Ω', resolution: 0.01, pctOfReading: 0.8, counts: 3 },
					{ label: '20 kΩ', resolution: 10, pctOfReading: 0.8, counts: 3 }
				],
				leadResistance: 0,
				relativeMode: true
			},
			temperature: { mode: 'measured', tempC: 18 },
			state: 'done'
		}),
		...READINGS.flatMap(([position, primary, secondary]) => [
			op('reading', ID(++n), { testId: DEMO_TEST_ID, checkKey: 'primary', position, samples: [{ value: primary, unit: 'Ω' }], rangeLabel: '200 Ω' }),
			op('reading', ID(++n), { testId: DEMO_TEST_ID, checkKey: 'secondary', position, samples: [{ value: secondary, unit: 'kΩ' }], rangeLabel: '20 kΩ' })
		])
	];
	return pushOps(tech, { deviceId: 'seed', ops } as never);
}
