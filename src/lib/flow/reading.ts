/**
 * Judging one check's reading from a test's snapshot — the same function on the phone
 * (offline) and on the server (whose answer is kept). Pure; values in base units.
 *
 * Steps: samples → base units (OL = Infinity) → settle (lowest below 10 Ω, else median;
 * far samples flagged) → subtract the lead resistance (not in relative mode; a reading below
 * it is a bad zero) → the meter's ± uncertainty → the band(s) that apply for the temperature
 * (both near the cold/hot edge or when it is unknown) → a verdict per band and overall.
 */
import { compensateLeads, isBadZero, pickSettled, uncertainty, type MeterRange } from '../domain/meter';
import { judge, type Judgement, type SpecBand, type Verdict } from '../domain/spec';
import { bandFor } from '../domain/temperature';
import { toBase } from '../domain/units';
import { rangeResolves } from './decisions';

export type Sample = { value: number | 'OL'; unit: string };
export type CheckSpec = {
	key: string;
	quantity: string;
	unit: string;
	openOk: boolean;
	bands: SpecBand[];
};
/** The range read on, and how the leads are handled (subtract them, or relative mode). */
export type MeterSnapshot = MeterRange & { leadResistance: number; relativeMode: boolean };
type MeterSetupLike = {
	ranges: (Omit<MeterRange, 'maxReading'> & { label: string; maxReading?: number | null })[];
	leadResistance: number;
	relativeMode: boolean;
};

/** The snapshot for one reading: the test's meter with the range it was read on. */
export function meterFor(meter: MeterSetupLike | null | undefined, rangeLabel?: string | null): MeterSnapshot {
	if (!meter || !meter.ranges?.length) {
		return { resolution: 1e-9, pctOfReading: 0, counts: 0, leadResistance: 0, relativeMode: false };
	}
	const { maxReading, ...range } = meter.ranges.find((r) => r.label === rangeLabel) ?? meter.ranges[0];
	return { ...range, ...(maxReading != null ? { maxReading } : {}), leadResistance: meter.leadResistance, relativeMode: meter.relativeMode };
}
/** `measured` gives a temperature; the others are what the technician could tell. */
export type TemperatureSnapshot =
	| { mode: 'measured'; tempC: number }
	| { mode: 'overnight' | 'warm' | 'just_run' | 'unknown' };

export type BandResult = Judgement & { fromC: number | null; toC: number | null };
export type ReadingResult = {
	value: number | null; // settled, leads subtracted; null when there were no samples
	settleMode: 'lowest' | 'median' | null;
	suspects: number[];
	badZero: boolean;
	u: number;
	bands: BandResult[];
	/** The verdict, or `depends` when the applicable specs disagree (temperature unclear). */
	verdict: Verdict | 'depends' | 'no_spec';
};

/** Representative temperatures for what the technician could tell (common practice). */
const TEMPS = { overnight: 20, just_run: 80 } as const;
/** Within this many °C of a band edge a measured temperature is judged against both bands. */
export const EDGE_MARGIN_C = 5;

/** The bands that apply: one, or both sides of an edge when the temperature is unclear. */
export function bandsFor(bands: readonly SpecBand[], t: TemperatureSnapshot): SpecBand[] {
	if (bands.length <= 1) return [...bands];
	if (t.mode === 'unknown' || t.mode === 'warm') return [...bands];
	const temp = t.mode === 'measured' ? t.tempC : TEMPS[t.mode];
	const margin = t.mode === 'measured' ? EDGE_MARGIN_C : 0;
	const found = [temp, temp - margin, temp + margin].map((x) => bandFor(bands, x));
	const unique = [...new Set(found.filter((b): b is SpecBand => b !== null))];
	return unique.sort((a, b) => (a.fromC ?? -Infinity) - (b.fromC ?? -Infinity)); // cold before hot
}

/** Judge a reading of `check` from its raw samples and the test's snapshot. */
export function evaluateReading(
	check: CheckSpec,
	samples: readonly Sample[],
	meter: MeterSnapshot,
	temperature: TemperatureSnapshot
): ReadingResult {
	const values = samples.map((s) => (s.value === 'OL' ? Infinity : toBase(s.value, s.unit)));
	const pick = pickSettled(values);
	const applicable = bandsFor(check.bands, temperature);
	if (!pick) return { value: null, settleMode: null, suspects: [], badZero: false, u: 0, bands: [], verdict: 'no_spec' };
	const resistance = check.quantity === 'resistance';
	const leads = resistance && !meter.relativeMode ? meter.leadResistance : 0;
	const badZero = leads > 0 && Number.isFinite(pick.value) && isBadZero(pick.value, leads);
	const value = leads > 0 ? compensateLeads(pick.value, leads) : pick.value;
	const u = Number.isFinite(value) ? uncertainty(value, meter) : 0;
	const bands = applicable.map((b) => ({
		fromC: b.fromC,
		toC: b.toC,
		...judge(value, b, u, { openOk: check.openOk })
	}));
	const verdicts = new Set(bands.map((b) => b.verdict));
	const verdict = bands.length === 0 ? 'no_spec' : verdicts.size === 1 ? bands[0].verdict : 'depends';
	return { value, settleMode: pick.mode, suspects: pick.suspects, badZero, u, bands, verdict };
}

/**
 * Whether the range a reading was taken on could not tell it from the limits of the bands
 * that apply at the test's temperature — the case the capture screen warns about before
 * a reading. Stored with each reading for the lead's overview.
 */
export function rangeUnresolvedOf(
	check: Pick<CheckSpec, 'bands'>,
	meter: MeterSetupLike | null | undefined,
	rangeLabel: string | null | undefined,
	temperature: TemperatureSnapshot
): boolean {
	return !rangeResolves(meterFor(meter, rangeLabel), bandsFor(check.bands, temperature));
}

/** Whether two results say the same thing (value within 1e-9 relative, same verdicts). */
export function sameResult(a: Pick<ReadingResult, 'value' | 'verdict'>, b: Pick<ReadingResult, 'value' | 'verdict'>) {
	if (a.verdict !== b.verdict) return false;
	if (a.value === b.value) return true;
	if (a.value == null || b.value == null) return false;
	return Math.abs(a.value - b.value) <= 1e-9 * Math.max(Math.abs(a.value), Math.abs(b.value));
}
