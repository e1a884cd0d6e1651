/**
 * The technician's meter: lead compensation, the accuracy of a range in the
 * ±(% of reading + counts) form, whether a range can tell a reading from a spec's limits,
 * and settling several samples into one value. Values in base units (Ω, V, A); an
 * over-range reading (OL) is `Infinity`.
 */
import { compareToReference, medianOf, MIN_VALUES_TO_COMPARE } from './compare';
import type { Limits } from './spec';

/** One range of a digital meter, as its accuracy table states it. */
export interface MeterRange {
	/** Percent of reading (0.5 means 0.5 %), ≥ 0. */
	pctOfReading: number;
	/** Number of counts (least significant digits) added, ≥ 0. */
	counts: number;
	/** Value of one count, the range's resolution, in base units, > 0. */
	resolution: number;
	/** Largest value the range can show, in base units; above it the meter shows OL. */
	maxReading?: number;
}

/**
 * Subtract the resistance of the test leads (read with the tips shorted) from a reading.
 * Both in ohms. Never below zero: a reading below the lead resistance is a bad zero, which
 * the flow warns about (see {@link isBadZero}). `Infinity` (OL) stays `Infinity`; `NaN`
 * stays `NaN`.
 */
export function compensateLeads(reading: number, leadResistance: number): number {
	return Math.max(0, reading - leadResistance);
}

/**
 * Whether a reading is below the lead resistance, i.e. the leads were zeroed badly or have
 * changed since (ohms): the part cannot read less than the leads in series with it, so
 * nothing can be said of it until the leads are read again. On a range whose resolution is
 * coarser than the leads (`resolution` > `leadResistance`, e.g. 0.2 Ω leads on a 10 Ω-count
 * range) the leads do not show at all and a reading below them is simply a low reading.
 */
export function isBadZero(reading: number, leadResistance: number, resolution = 0): boolean {
	return reading < leadResistance && leadResistance >= resolution;
}

/**
 * The ± absolute uncertainty of a reading on a range specified as ±(% of reading + counts):
 * `|reading| · pctOfReading / 100 + counts · resolution`, in the reading's unit.
 * `Infinity` for an OL reading.
 */
export function uncertainty(
	reading: number,
	{ pctOfReading, counts, resolution }: Pick<MeterRange, 'pctOfReading' | 'counts' | 'resolution'>
): number {
	return (Math.abs(reading) * pctOfReading) / 100 + counts * resolution;
}

/**
 * The ± of a reading with the test leads taken off (or a meter in relative mode, which takes
 * off the reading it was zeroed on): the limit of error of the raw `reading` plus the limit
 * of error of the `leadReading`, in ohms. Both are worked out on what the meter showed (not
 * on the difference), each in the ±(% of reading + counts) form of its range; the lead
 * reading is on `leadRange` (by default the same range).
 *
 * The two are added (the worst case), not combined in quadrature: a meter's accuracy is a
 * limit of error, not a standard deviation, and both errors may lie on the same side.
 * Example: ±(0.5 % + 2 counts) at 0.01 Ω, 0.61 Ω read with 0.20 Ω leads →
 * (0.00305 + 0.02) + (0.001 + 0.02) = ±0.04405 Ω on 0.41 Ω.
 */
export function compensatedUncertainty(
	reading: number,
	leadReading: number,
	range: Pick<MeterRange, 'pctOfReading' | 'counts' | 'resolution'>,
	leadRange: Pick<MeterRange, 'pctOfReading' | 'counts' | 'resolution'> = range
): number {
	return uncertainty(reading, range) + uncertainty(leadReading, leadRange);
}

/**
 * Whether `range` is the highest of `ranges` (the ranges of one quantity on one meter):
 * no other range reaches further. Ranges are compared by `maxReading` when both state one,
 * else by resolution (a coarser count belongs to a higher range). OL on the highest range
 * means the value is beyond the meter (for a resistance, an open circuit); OL on any other
 * range only means "over range": read again one range up.
 */
export function isHighestRange(
	range: Pick<MeterRange, 'resolution' | 'maxReading'>,
	ranges: readonly Pick<MeterRange, 'resolution' | 'maxReading'>[]
): boolean {
	const above = (a: typeof range, b: typeof range) =>
		a.maxReading != null && b.maxReading != null
			? a.maxReading > b.maxReading
			: a.resolution > b.resolution;
	return !ranges.some((other) => above(other, range));
}

/**
 * Ratio a range must reach against a spec: the 4 : 1 test uncertainty ratio that
 * ANSI/NCSL Z540.3 falls back to when the false-accept risk is not computed.
 */
export const MIN_UNCERTAINTY_RATIO = 4;

/**
 * How well a range can judge a spec: the smallest, over the non-null limits L, of
 * `T / u(L)` where
 * - `T` is the spec's half-width `(max − min) / 2` for a two-sided spec, or `|L|` for a
 *   one-sided one (our extension: there is no band to halve);
 * - `u(L)` is the range's uncertainty at the limit, but never less than half a count
 *   (the display cannot show a difference smaller than its resolution).
 *
 * 0 when a limit is beyond the range's `maxReading` (the limit would read OL);
 * `Infinity` with no limits.
 */
export function resolvingRatio(range: MeterRange, { min, max }: Limits): number {
	const limits = [min, max].filter((l): l is number => l !== null);
	const maxReading = range.maxReading ?? Infinity;
	if (limits.some((l) => Math.abs(l) > maxReading)) return 0;
	const halfWidth = min !== null && max !== null ? (max - min) / 2 : null;
	return Math.min(
		...limits.map((limit) => {
			const u = Math.max(uncertainty(limit, range), range.resolution / 2);
			return (halfWidth ?? Math.abs(limit)) / u;
		})
	);
}

/**
 * Decide, before measuring, whether a range can tell a reading from the spec's limits.
 * Rule: {@link resolvingRatio} ≥ `minRatio` (default {@link MIN_UNCERTAINTY_RATIO} = 4),
 * i.e. the uncertainty at each limit is at most a quarter of the spec's half-width (or of
 * the limit itself for a one-sided spec), and the limits fit on the range.
 * A spec with no limits is always resolvable.
 */
export function canResolve(
	range: MeterRange,
	limits: Limits,
	minRatio: number = MIN_UNCERTAINTY_RATIO
): boolean {
	return resolvingRatio(range, limits) >= minRatio;
}

/** How several samples of one measurement become one value. */
export type SettleMode = 'lowest' | 'median';

/**
 * Settle samples into one value: `lowest` is the plain minimum, `median` the median (mean
 * of the two middle samples for an even count). `NaN` samples are ignored; OL samples
 * (`Infinity`) count as the largest values.
 *
 * @returns the value, or `null` when there are no samples.
 */
export function settledValue(samples: readonly number[], mode: SettleMode): number | null {
	const valid = samples.filter((s) => !Number.isNaN(s));
	if (valid.length === 0) return null;
	return mode === 'lowest' ? Math.min(...valid) : medianOf(valid);
}

/** Below this many ohms the lowest sample is kept (common practice, see {@link pickSettled}). */
export const LOWEST_BELOW_OHM = 10;

/** Result of {@link pickSettled}. */
export interface SettledPick {
	/** Settled value in ohms (`Infinity` when the samples read OL), from the samples kept. */
	value: number;
	/** How it was settled. */
	mode: SettleMode;
	/** Indexes of samples far from the others: left out of the value; the flow asks for another. */
	suspects: number[];
}

/** Options for {@link pickSettled}. */
export interface SettleOptions {
	/** Allowed deviation from the median of all samples, a fraction (default 0.1 = 10 %). */
	tolerance?: number;
	/**
	 * The meter's ± at a value (same unit). When given, a sample is flagged only when it is
	 * also further from the median than the two readings' combined ± (a difference the meter
	 * cannot resolve is not a far sample).
	 */
	uncertaintyOf?: (value: number) => number;
	/** Force a mode; by default {@link LOWEST_BELOW_OHM} decides (resistance). */
	mode?: SettleMode;
}

/**
 * Settle samples into one value the way the flow does. Samples far from the median of all
 * samples (by more than `tolerance` of it, and by more than the combined ± when
 * `uncertaintyOf` is given; needs 3 samples) are flagged and left out: a flagged sample never
 * becomes the value. The rest are settled by `mode`, or for resistance below
 * {@link LOWEST_BELOW_OHM} by their lowest (contact resistance only ever adds, so the lowest
 * is the best contact; common practice), otherwise by their median.
 * (The median of all, not of the others as in `findOutliers`: with three samples the median
 * of the other two is their mean, which an outlier drags, and good samples would be flagged.)
 *
 * @returns the pick, or `null` when there are no samples.
 */
export function pickSettled(
	samples: readonly number[],
	{ tolerance = 0.1, uncertaintyOf, mode: forced }: SettleOptions = {}
): SettledPick | null {
	// Written as plain loops: the server runs this for every reading of a sync push.
	const valid: number[] = [];
	for (const s of samples) if (!Number.isNaN(s)) valid.push(s);
	if (valid.length === 0) return null;
	const sorted = valid.sort(ascending);
	const median = middleOf(sorted);
	const suspects: number[] = [];
	if (sorted.length >= MIN_VALUES_TO_COMPARE) {
		for (let i = 0; i < samples.length; i++) {
			const s = samples[i];
			if (Number.isNaN(s) || compareToReference(s, median, tolerance) === 0) continue;
			const far =
				!uncertaintyOf || !Number.isFinite(s) || !Number.isFinite(median)
					? true
					: Math.abs(s - median) > uncertaintyOf(s) + uncertaintyOf(median);
			if (far) suspects.push(i);
		}
	}
	let kept = sorted;
	if (suspects.length) {
		const rest: number[] = [];
		for (let i = 0; i < samples.length; i++)
			if (!Number.isNaN(samples[i]) && !suspects.includes(i)) rest.push(samples[i]);
		if (rest.length) kept = rest.sort(ascending);
	}
	const keptMedian = kept === sorted ? median : middleOf(kept);
	const mode: SettleMode = forced ?? (keptMedian < LOWEST_BELOW_OHM ? 'lowest' : 'median');
	return { value: mode === 'lowest' ? kept[0] : keptMedian, mode, suspects };
}

const ascending = (a: number, b: number) => a - b;
/** The median of values sorted ascending (not empty), as {@link medianOf} gives it. */
function middleOf(sorted: readonly number[]): number {
	const mid = sorted.length >> 1;
	if (sorted.length % 2 === 1) return sorted[mid];
	const [a, b] = [sorted[mid - 1], sorted[mid]];
	return a === b ? a : (a + b) / 2;
}
