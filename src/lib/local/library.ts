/** The spec library, tests and readings as the phone holds them. */
import type { CheckSpec } from '../flow/reading';
import type { MeterSetup } from '../schemas/test';
import { getMeta, getRecord, listByJob, listRecords, setMeta, type LocalDb } from '../client/local-db';

export type Fitment = { make: string; model: string; yearFrom?: number | null; yearTo?: number | null; engineCode?: string | null };
export type Sheet = { id: string; sheetVersion: number; checks: (CheckSpec & { label: string; from?: string | null; to?: string | null; condition: string; rangeHint?: string | null })[]; source: Record<string, string | null> | null };
export type Part = {
	id: string;
	partNumber: string;
	kind: string;
	description: string | null;
	fitment: Fitment[];
	cautions: string[];
	positions: { position: string; cylinders: number[] }[];
	sheet: Sheet | null;
	fits: boolean;
};

/** Components with their newest approved sheet; parts that fit the vehicle first. */
export async function listParts(db: LocalDb, vehicle: { make: string; model: string } | null): Promise<Part[]> {
	const sheets = (await listRecords(db, 'sheet')).filter((s) => s.data.state === 'approved');
	const parts = (await listRecords(db, 'component')).map((c): Part => {
		const mine = sheets
			.filter((s) => s.data.componentId === c.id)
			.sort((a, b) => (b.data.sheetVersion as number) - (a.data.sheetVersion as number))[0];
		const fitment = (c.data.fitment as Fitment[]) ?? [];
		const same = (a?: string, b?: string) => (a ?? '').toLowerCase() === (b ?? '').toLowerCase();
		return {
			id: c.id,
			partNumber: c.data.partNumber as string,
			kind: c.data.kind as string,
			description: (c.data.description as string) ?? null,
			fitment,
			cautions: (c.data.cautions as string[]) ?? [],
			positions: (c.data.positions as Part['positions']) ?? [],
			sheet: mine ? { id: mine.id, sheetVersion: mine.data.sheetVersion as number, checks: mine.data.checks as Sheet['checks'], source: (mine.data.source as Sheet['source']) ?? null } : null,
			fits: !!vehicle && fitment.some((f) => same(f.make, vehicle.make) && same(f.model, vehicle.model))
		};
	});
	return parts.sort((a, b) => Number(b.fits) - Number(a.fits) || a.partNumber.localeCompare(b.partNumber));
}

export async function readSheet(db: LocalDb, id: string): Promise<Sheet | null> {
	const s = await getRecord(db, 'sheet', id);
	return s ? { id: s.id, sheetVersion: s.data.sheetVersion as number, checks: s.data.checks as Sheet['checks'], source: (s.data.source as Sheet['source']) ?? null } : null;
}

export async function listUnder(db: LocalDb, jobId: string, entity: string) {
	return (await listByJob(db, jobId)).filter((r) => r.entity === entity);
}

/** An example meter for a first start (invented figures: edit them to match yours). */
export const EXAMPLE_METER: Omit<MeterSetup, 'leadResistance' | 'relativeMode'> = {
	name: 'Example meter — edit to match yours',
	ranges: [
		{ label: '200 Ω', resolution: 0.1, pctOfReading: 0.8, counts: 3, maxReading: 199.9 },
		{ label: '20 Ω (low-ohm)', resolution: 0.01, pctOfReading: 0.5, counts: 2, maxReading: 19.99 },
		{ label: '20 kΩ', resolution: 10, pctOfReading: 0.8, counts: 1, maxReading: 19990 },
		{ label: '200 kΩ', resolution: 100, pctOfReading: 0.8, counts: 1, maxReading: 199900 }
	]
};

export type SavedMeter = typeof EXAMPLE_METER;
export async function getMeters(db: LocalDb): Promise<SavedMeter[]> {
	return (await getMeta<SavedMeter[]>(db, 'meters')) ?? [EXAMPLE_METER];
}
export const saveMeters = (db: LocalDb, meters: SavedMeter[]) => setMeta(db, 'meters', meters);

/** Lead resistance zeroed this shift (12 hours), or null when it should be measured again. */
export type LeadZero = { mode: 'subtract' | 'relative'; ohms: number; at: string };
export const SHIFT_MS = 12 * 3600_000;
export async function getLeadZero(db: LocalDb, now = Date.now()): Promise<LeadZero | null> {
	const z = await getMeta<LeadZero>(db, 'leadZero');
	return z && now - new Date(z.at).getTime() < SHIFT_MS ? z : null;
}
export const saveLeadZero = (db: LocalDb, z: LeadZero) => setMeta(db, 'leadZero', z);
