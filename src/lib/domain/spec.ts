/**
 * Judging a measured value against a spec's limits, with the meter's uncertainty, and the
 * helpers around it: the expected band at another temperature, a unit typed wrong, and a
 * judgement near the edge between a cold and a hot band. Values in base units.
 */
import { bandFor, correctResistance, type Conductor, type TemperatureRange } from './temperature';

/** Inclusive limits in base units; `null` means no limit on that side. `min` ≤ `max`. */
export interface Limits {
	min: number | null;
	max: number | null;
}

/** A spec's limits that apply in a temperature range `[fromC, toC)` (°C). */
export type SpecBand = TemperatureRange & Limits;

/** Outcome of a check: inside, too close to a limit to tell, or outside on either side. */
export type Verdict = 'within' | 'borderline' | 'low' | 'high';

/** Result of {@link judge}. */
export interface Judgement {
	verdict: Verdict;
	/** Signed distance to the nearest limit in base units: > 0 inside, < 0 outside. */
	margin: number;
	/** `margin` as a percentage of the nearest limit's value; `null` for a zero or no limit. */
	marginPct: number | null;
	/** Which limit is nearest (the violated one when outside); `null` with no limits. */
	nearest: 'min' | 'max' | null;
}

/** Options for {@link judge}. */
export interface JudgeOptions {
	/** The check accepts an open circuit: an OL reading (`Infinity`) is `within`. */
	openOk?: boolean;
}

function assertLimits({ min, max }: Limits): void {
	if (Number.isNaN(min) || Number.isNaN(max)) throw new RangeError('A limit is NaN');
	if (min !== null && max !== null && min > max) {
		throw new RangeError(`min ${min} is above max ${max}`);
	}
}

/** Verdict for a finite value with uncertainty `u` (≥ 0). */
function classify(value: number, u: number, { min, max }: Limits): Verdict {
	const straddles = (limit: number | null) =>
		limit !== null && value - u < limit && limit < value + u;
	if (straddles(min) || straddles(max)) return 'borderline';
	if (min !== null && value < min) return 'low';
	if (max !== null && value > max) return 'high';
	return 'within';
}

/** Margin to the nearest limit, and that limit; ties go to `min`. */
function measureMargin(value: number, { min, max }: Limits): Omit<Judgement, 'verdict'> {
	const toMin = min === null ? Infinity : value - min;
	const toMax = max === null ? Infinity : max - value;
	if (min === null && max === null) return { margin: Infinity, marginPct: null, nearest: null };
	const nearest = toMin <= toMax ? 'min' : 'max';
	const margin = Math.min(toMin, toMax);
	const limit = nearest === 'min' ? min : max;
	const marginPct = limit === null || limit === 0 ? null : (margin / Math.abs(limit)) * 100;
	return { margin, marginPct, nearest };
}

/** Judgement for an over-range reading: +OL is high unless open is accepted, −OL is low. */
function judgeOverRange(value: number, { min, max }: Limits, openOk: boolean): Judgement {
	const open: Judgement = { verdict: 'within', margin: Infinity, marginPct: null, nearest: null };
	if (value > 0 && openOk) return open;
	const side = value > 0 ? 'max' : 'min';
	const present = (side === 'max' ? max : min) !== null;
	const verdict = value > 0 ? 'high' : 'low';
	return { verdict, margin: -Infinity, marginPct: null, nearest: present ? side : null };
}

/**
 * Judge a value against inclusive limits, given the meter's ± uncertainty `u` (same unit).
 *
 * - `borderline` exactly when `[value − u, value + u]` strictly crosses a limit (the meter
 *   cannot tell the value from the limit); touching a limit does not count;
 * - otherwise `low` below `min`, `high` above `max`, else `within` (limits inclusive);
 * - `Infinity` (OL) is `high`, or `within` when `opts.openOk`; `-Infinity` is `low`.
 *
 * With `u = 0` the verdict is never `borderline`. No limits at all → `within`.
 *
 * @throws RangeError for a NaN value, a negative or NaN `u`, or limits with min > max.
 */
export function judge(value: number, limits: Limits, u = 0, opts: JudgeOptions = {}): Judgement {
	assertLimits(limits);
	if (Number.isNaN(value)) throw new RangeError('Cannot judge NaN');
	if (!(u >= 0)) throw new RangeError(`Uncertainty must be ≥ 0, got ${u}`);
	if (!Number.isFinite(value)) return judgeOverRange(value, limits, opts.openOk ?? false);
	return { verdict: classify(value, u, limits), ...measureMargin(value, limits) };
}

/**
 * Scale a band's resistance limits (ohms), given at `bandRefC`, to `tempC` with the
 * conductor's temperature correction. Shown as a hint only: the verdict uses the maker's
 * bands as given. `null` limits stay `null`; other fields are kept.
 *
 * @throws RangeError when a temperature is at or below −T₀ (see `correctResistance`).
 */
export function expectedBandAt<L extends Limits>(
	band: L,
	bandRefC: number,
	tempC: number,
	material: Conductor = 'copper'
): L {
	const scale = (limit: number | null) =>
		limit === null ? null : correctResistance(limit, bandRefC, tempC, material);
	return { ...band, min: scale(band.min), max: scale(band.max) };
}

/** Factors by which a value typed in a neighbouring prefix differs: k/m once, M/µ twice. */
export const PREFIX_FACTORS = [1e3, 1e-3, 1e6, 1e-6] as const;

/** Result of {@link suspectUnit}: multiply the value by `factor` to get `value`. */
export interface UnitSuspicion {
	factor: number;
	value: number;
}

/**
 * Whether a value looks typed in the wrong unit for a spec. Rule: the spec has both limits,
 * the value (finite, non-zero) is outside them, and multiplying it by one of
 * {@link PREFIX_FACTORS} (tried in that order: one prefix step before two) puts it inside
 * the limits. E.g. 12.28 against 9 000–15 400 Ω suggests ×1000 (kΩ typed as Ω).
 * A one-sided spec never raises a suspicion (almost any scaled value would pass it).
 *
 * @returns the suggested factor and scaled value, or `null`.
 */
export function suspectUnit(value: number, { min, max }: Limits): UnitSuspicion | null {
	if (min === null || max === null || !Number.isFinite(value) || value === 0) return null;
	const inside = (v: number) => v >= min && v <= max;
	if (inside(value)) return null;
	const factor = PREFIX_FACTORS.find((f) => inside(value * f));
	return factor === undefined ? null : { factor, value: value * factor };
}

/** One band's judgement in {@link judgeAcrossBands}. */
export interface BandJudgement<B extends SpecBand> {
	band: B;
	judgement: Judgement;
}

/** Default distance to a band edge, °C, within which the neighbouring band is also judged. */
export const BAND_EDGE_MARGIN_C = 5;

/**
 * Judge a value against the band for `tempC` and, when `tempC` is within `marginC` (°C,
 * default {@link BAND_EDGE_MARGIN_C}) of a band edge, also against the neighbouring band:
 * a component's temperature taken by hand or infrared is only known to a few degrees.
 *
 * @returns `results`, the band containing `tempC` first (if any), and `agree`, whether all
 *   verdicts are the same (the flow shows both when they differ).
 */
export function judgeAcrossBands<B extends SpecBand>(
	value: number,
	bands: readonly B[],
	tempC: number,
	{ u = 0, openOk = false, marginC = BAND_EDGE_MARGIN_C } = {}
): { results: BandJudgement<B>[]; agree: boolean } {
	const candidates = [tempC, tempC - marginC, tempC + marginC].map((t) => bandFor(bands, t));
	const unique = [...new Set(candidates.filter((b): b is B => b !== null))];
	const results = unique.map((band) => ({ band, judgement: judge(value, band, u, { openOk }) }));
	const agree = results.every((r) => r.judgement.verdict === results[0].judgement.verdict);
	return { results, agree };
}
