/**
 * Judging one check's reading from a test's snapshot — the same function on the phone
 * (offline) and on the server (whose answer is kept). Pure; values in base units.
 *
 * Steps: samples → base units (OL = Infinity) → settle (resistance: lowest below 10 Ω, else
 * median; voltage and current: median; a sample far from the others is flagged and left
 * out) → OL: open circuit on the meter's highest range (or when the sheet accepts open),
 * otherwise "over range" → the leads: a reading below them is a bad zero (no verdict);
 * otherwise subtract them (not in relative mode, where the meter already did) → the ± of the
 * reading and of the lead reading, added → the band(s) that apply for the temperature (both
 * near the cold/hot edge or when it is unknown) → a verdict per band and overall.
 */
import {
	canResolve,
	compensatedUncertainty,
	compensateLeads,
	isBadZero,
	isHighestRange,
	pickSettled,
	uncertainty,
	type MeterRange
} from '../domain/meter';
import { judge, type Judgement, type SpecBand, type Verdict } from '../domain/spec';
import { bandFor } from '../domain/temperature';
import { toBase } from '../domain/units';

/** Whether a range can tell a reading from the limits of every band that applies. */
export function rangeResolves(range: MeterRange, bands: readonly SpecBand[]): boolean {
	return bands.every((b) => canResolve(range, b));
}

export type Sample = { value: number | 'OL'; unit: string };
/** What a meter range measures; voltage drop is read on a voltage range. */
export type RangeQuantity = 'resistance' | 'voltage' | 'current';
export type CheckSpec = {
	key: string;
	quantity: string;
	unit: string | null;
	openOk: boolean;
	bands: SpecBand[];
	/** A pack's coil this check belongs to (its position name); absent or null: every coil. */
	coil?: string | null;
};
/** A visual check's finding: OK or not, with a note. */
export type VisualFinding = { ok: boolean; note?: string | null };

type RangeLike = Pick<MeterRange, 'resolution' | 'pctOfReading' | 'counts'>;
/**
 * The range read on and how the leads are handled: subtract `leadResistance` (read with the
 * tips shorted), or relative mode (the meter zeroed on `zeroReading`). `leadRange` is the
 * range the leads were read on; `highest` says whether this is the meter's highest range of
 * its quantity (OL there is beyond the meter).
 */
export type MeterSnapshot = MeterRange & {
	leadResistance: number;
	relativeMode: boolean;
	zeroReading?: number | null;
	leadRange?: RangeLike;
	highest?: boolean;
	quantity?: RangeQuantity;
};
type RangeSetup = Omit<MeterRange, 'maxReading'> & {
	label: string;
	maxReading?: number | null;
	quantity?: RangeQuantity | null;
};
type MeterSetupLike = {
	ranges: RangeSetup[];
	leadResistance: number;
	relativeMode: boolean;
	zeroReading?: number | null;
};

/** The quantity of meter range a check is read on. */
export function rangeQuantityOf(checkQuantity: string): RangeQuantity {
	if (checkQuantity === 'current') return 'current';
	if (checkQuantity === 'voltage' || checkQuantity === 'voltage_drop') return 'voltage';
	return 'resistance';
}
/** A range's quantity; ranges saved before ranges had one are resistance ranges. */
export const quantityOfRange = (r: { quantity?: RangeQuantity | null }): RangeQuantity =>
	r.quantity ?? 'resistance';

/**
 * The snapshot for one reading: the test's meter with the range it was read on (by label;
 * else the first range of the check's quantity, else the first), whether that range is the
 * highest of its quantity, and the range the leads were read on (the finest resistance range:
 * common practice is to short the tips on the lowest Ω range).
 */
export function meterFor(
	meter: MeterSetupLike | null | undefined,
	rangeLabel?: string | null,
	quantity: RangeQuantity = 'resistance'
): MeterSnapshot {
	if (!meter || !meter.ranges?.length) {
		return { resolution: 1e-9, pctOfReading: 0, counts: 0, leadResistance: 0, relativeMode: false, highest: true };
	}
	const picked =
		meter.ranges.find((r) => r.label === rangeLabel) ??
		meter.ranges.find((r) => quantityOfRange(r) === quantity) ??
		meter.ranges[0];
	const { maxReading, label: _label, quantity: _q, ...range } = picked;
	const kind = quantityOfRange(picked);
	const same = meter.ranges.filter((r) => quantityOfRange(r) === kind);
	const ohms = meter.ranges.filter((r) => quantityOfRange(r) === 'resistance');
	const finest = ohms.length ? ohms.reduce((a, b) => (b.resolution < a.resolution ? b : a)) : picked;
	const plain = (r: RangeSetup) => ({ resolution: r.resolution, maxReading: r.maxReading ?? undefined });
	return {
		...range,
		...(maxReading != null ? { maxReading } : {}),
		leadResistance: meter.leadResistance,
		relativeMode: meter.relativeMode,
		...(meter.zeroReading != null ? { zeroReading: meter.zeroReading } : {}),
		leadRange: { resolution: finest.resolution, pctOfReading: finest.pctOfReading, counts: finest.counts },
		highest: isHighestRange(plain(picked), same.map(plain)),
		quantity: kind
	};
}
/** `measured` gives a temperature; the others are what the technician could tell. */
export type TemperatureSnapshot =
	| { mode: 'measured'; tempC: number }
	| { mode: 'overnight' | 'warm' | 'just_run' | 'unknown' };

/**
 * A reading's verdict: a band verdict, or `depends` (the cold and hot specs disagree),
 * `no_spec` (no band for the temperature), `bad_zero` (below the leads: read them again),
 * `over_range` (OL on a range that is not the meter's highest: read one range up),
 * `not_ok` (a visual check found a fault).
 */
export type ReadingVerdict = Verdict | 'depends' | 'no_spec' | 'bad_zero' | 'over_range' | 'not_ok';
export type BandResult = Judgement & { fromC: number | null; toC: number | null };
export type ReadingResult = {
	value: number | null; // settled, leads subtracted; null when there were no samples
	settleMode: 'lowest' | 'median' | null;
	/** Samples far from the others, left out of the value (the flow asks for another). */
	suspects: number[];
	badZero: boolean;
	/** ± of the value: the reading's limit of error plus the lead reading's (compensated). */
	u: number;
	bands: BandResult[];
	/** The verdict, or `depends` when the applicable specs disagree (temperature unclear). */
	verdict: ReadingVerdict;
};

/** Representative temperatures for what the technician could tell (common practice). */
export const TEMPS = { overnight: 20, just_run: 80 } as const;
/** Within this many °C of a band edge a measured temperature is judged against both bands. */
export const EDGE_MARGIN_C = 5;

const byTemperature = (a: SpecBand, b: SpecBand) => (a.fromC ?? -Infinity) - (b.fromC ?? -Infinity);

/**
 * The bands that apply: the band for the temperature, or both sides of an edge when a
 * measured temperature is within {@link EDGE_MARGIN_C} of it (a part's temperature taken by
 * hand or infrared is only known to a few degrees), or every band when it is unclear
 * (`warm`, `unknown`). None when the sheet has no band near the temperature.
 */
export function bandsFor(bands: readonly SpecBand[], t: TemperatureSnapshot): SpecBand[] {
	if (t.mode === 'unknown' || t.mode === 'warm') return [...bands].sort(byTemperature);
	const temp = t.mode === 'measured' ? t.tempC : TEMPS[t.mode];
	const margin = t.mode === 'measured' ? EDGE_MARGIN_C : 0;
	const found = [temp, temp - margin, temp + margin].map((x) => bandFor(bands, x));
	const unique = [...new Set(found.filter((b): b is SpecBand => b !== null))];
	return unique.sort(byTemperature); // cold before hot
}

const EMPTY = { settleMode: null, suspects: [], badZero: false, u: 0, bands: [] };

/** Judge a reading of `check` from its raw samples and the test's snapshot. */
export function evaluateReading(
	check: CheckSpec,
	samples: readonly Sample[],
	meter: MeterSnapshot,
	temperature: TemperatureSnapshot,
	visual?: VisualFinding | null
): ReadingResult {
	if (check.quantity === 'visual') {
		const verdict = visual == null ? 'no_spec' : visual.ok ? 'within' : 'not_ok';
		return { value: null, ...EMPTY, verdict };
	}
	const values = samples.map((s) => (s.value === 'OL' ? Infinity : toBase(s.value, s.unit)));
	const resistance = check.quantity === 'resistance';
	const pick = pickSettled(values, {
		uncertaintyOf: (v) => uncertainty(v, meter),
		...(resistance ? {} : { mode: 'median' as const })
	});
	if (!pick) return { value: null, ...EMPTY, verdict: 'no_spec' };
	const base = { settleMode: pick.mode, suspects: pick.suspects };
	if (pick.value === Infinity && !check.openOk && meter.highest === false) {
		return { value: Infinity, ...base, badZero: false, u: 0, bands: [], verdict: 'over_range' };
	}
	const zero = meter.relativeMode ? (meter.zeroReading ?? 0) : 0;
	const leads = resistance && !meter.relativeMode ? meter.leadResistance : 0;
	const finite = Number.isFinite(pick.value);
	if (leads > 0 && finite && isBadZero(pick.value, leads, meter.resolution)) {
		return { value: compensateLeads(pick.value, leads), ...base, badZero: true, u: 0, bands: [], verdict: 'bad_zero' };
	}
	const value = leads > 0 ? compensateLeads(pick.value, leads) : pick.value;
	const leadRange = meter.leadRange ?? meter;
	const u = !finite
		? 0
		: leads > 0
			? compensatedUncertainty(pick.value, leads, meter, leadRange)
			: resistance && meter.relativeMode
				? compensatedUncertainty(pick.value + zero, zero, meter, leadRange)
				: uncertainty(pick.value, meter);
	const bands = bandsFor(check.bands, temperature).map((b) => ({
		fromC: b.fromC,
		toC: b.toC,
		...judge(value, b, u, { openOk: check.openOk })
	}));
	const verdicts = new Set(bands.map((b) => b.verdict));
	const verdict = bands.length === 0 ? 'no_spec' : verdicts.size === 1 ? bands[0].verdict : 'depends';
	return { value, ...base, badZero: false, u, bands, verdict };
}

/**
 * Whether the range a reading was taken on could not tell it from the limits of the bands
 * that apply at the test's temperature — the case the capture screen warns about before
 * a reading. Stored with each reading for the lead's overview.
 */
export function rangeUnresolvedOf(
	check: Pick<CheckSpec, 'bands' | 'quantity'>,
	meter: MeterSetupLike | null | undefined,
	rangeLabel: string | null | undefined,
	temperature: TemperatureSnapshot
): boolean {
	return !rangeResolves(meterFor(meter, rangeLabel, rangeQuantityOf(check.quantity)), bandsFor(check.bands, temperature));
}

/** A result as stored: an OL value may come as `null` with `ol: true` (JSON has no Infinity). */
type Comparable = { value: number | null; verdict: string; ol?: unknown };
const valueOf = (r: Comparable) => (r.value == null && r.ol === true ? Infinity : r.value);

/** Whether two results say the same thing (value within 1e-9 relative, same verdicts). */
export function sameResult(a: Comparable, b: Comparable) {
	if (a.verdict !== b.verdict) return false;
	const [x, y] = [valueOf(a), valueOf(b)];
	if (x === y) return true;
	if (x == null || y == null) return false;
	return Math.abs(x - y) <= 1e-9 * Math.max(Math.abs(x), Math.abs(y));
}
