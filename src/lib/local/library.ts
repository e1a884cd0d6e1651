/** The spec library, tests and readings as the phone holds them. */
import type { CheckSpec } from '../flow/reading';
import type { MeterSetup } from '../schemas/test';
import { getMeta, getRecord, listByJob, listRecords, setMeta, type LocalDb } from '../client/local-db';

export type Fitment = { make: string; model: string; yearFrom?: number | null; yearTo?: number | null; engineCode?: string | null };
export type SheetCheck = CheckSpec & { label: string; from?: string | null; to?: string | null; condition: string; rangeHint?: string | null };
export type Sheet = { id: string; sheetVersion: number; checks: SheetCheck[]; source: Record<string, string | null> | null };
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

/** A part's own cautions and coil map, as the test flow needs them. */
export async function readPart(db: LocalDb, id: string): Promise<Pick<Part, 'id' | 'partNumber' | 'cautions' | 'positions'> | null> {
	const c = await getRecord(db, 'component', id);
	if (!c) return null;
	return {
		id: c.id,
		partNumber: c.data.partNumber as string,
		cautions: (c.data.cautions as string[]) ?? [],
		positions: (c.data.positions as Part['positions']) ?? []
	};
}

export async function listUnder(db: LocalDb, jobId: string, entity: string) {
	return (await listByJob(db, jobId)).filter((r) => r.entity === entity);
}

/** An example meter for a first start (invented figures: edit them to match yours). */
export const EXAMPLE_METER: Omit<MeterSetup, 'leadResistance' | 'relativeMode' | 'zeroReading' | 'leadReadAt'> = {
	name: 'Example meter — edit to match yours',
	ranges: [
		{ label: '200 Ω', quantity: 'resistance', resolution: 0.1, pctOfReading: 0.8, counts: 3, maxReading: 199.9 },
		{ label: '20 Ω (low-ohm)', quantity: 'resistance', resolution: 0.01, pctOfReading: 0.5, counts: 2, maxReading: 19.99 },
		{ label: '20 kΩ', quantity: 'resistance', resolution: 10, pctOfReading: 0.8, counts: 1, maxReading: 19990 },
		{ label: '200 kΩ', quantity: 'resistance', resolution: 100, pctOfReading: 0.8, counts: 1, maxReading: 199900 },
		{ label: '200 mV', quantity: 'voltage', resolution: 0.0001, pctOfReading: 0.5, counts: 2, maxReading: 0.1999 },
		{ label: '20 V', quantity: 'voltage', resolution: 0.01, pctOfReading: 0.5, counts: 2, maxReading: 19.99 },
		{ label: '200 V', quantity: 'voltage', resolution: 0.1, pctOfReading: 0.5, counts: 2, maxReading: 199.9 },
		{ label: '200 mA', quantity: 'current', resolution: 0.0001, pctOfReading: 1, counts: 3, maxReading: 0.1999 },
		{ label: '10 A', quantity: 'current', resolution: 0.01, pctOfReading: 1.5, counts: 3, maxReading: 9.99 }
	]
};

export type SavedMeter = typeof EXAMPLE_METER;
export async function getMeters(db: LocalDb): Promise<SavedMeter[]> {
	return (await getMeta<SavedMeter[]>(db, 'meters')) ?? [EXAMPLE_METER];
}
export const saveMeters = (db: LocalDb, meters: SavedMeter[]) => setMeta(db, 'meters', meters);

/**
 * The last lead reading on this phone (mode, ohms, when): shown as a reminder when a test
 * starts. It is never carried into a test by itself: every test reads the leads again.
 */
export type LeadZero = { mode: 'subtract' | 'relative'; ohms: number; at: string };
export const getLastLeadZero = (db: LocalDb) => getMeta<LeadZero>(db, 'leadZero').then((z) => z ?? null);
export const saveLeadZero = (db: LocalDb, z: LeadZero) => setMeta(db, 'leadZero', z);

/**
 * The part a job's spark or swap test is about: the part of the job's latest test, else the
 * first part that fits the vehicle, else none.
 */
export async function partForJob(db: LocalDb, jobId: string, vehicle: { make: string; model: string } | null): Promise<Part | null> {
	const parts = await listParts(db, vehicle);
	const tests = (await listUnder(db, jobId, 'test')).sort((a, b) => b.updatedAt.localeCompare(a.updatedAt));
	const tested = tests.map((t) => parts.find((p) => p.id === t.data.componentId)).find(Boolean);
	return tested ?? parts.find((p) => p.fits) ?? null;
}
