/**
 * Odd-one-out: compare the same measurement across positions (cylinders, coils, injectors)
 * when the maker gives no spec, or as a second opinion beside it.
 */

/** Which deviations `findOutliers` reports. */
export type OutlierDirection = 'low' | 'high' | 'both';

/** Options for {@link findOutliers}. */
export interface OutlierOptions {
	/** Allowed deviation as a fraction of the reference median (0.1 = 10 %), ≥ 0. */
	tolerance: number;
	/** Report only values below (`low`), above (`high`) or on either side (`both`). */
	direction: OutlierDirection;
	/**
	 * The ± of each position's value (same unit, by key). When given, a difference smaller
	 * than the value's ± plus the reference's ± is never flagged: the meter cannot tell the two
	 * apart. A missing key counts as 0.
	 */
	uncertainty?: Readonly<Record<string, number>>;
}

/** Fewest values that make a comparison meaningful: with two, neither is "the odd one". */
export const MIN_VALUES_TO_COMPARE = 3;

/**
 * Median of a list of numbers; `NaN` entries are ignored, `Infinity` (OL) counts as the
 * largest value. With an even count it is the mean of the two middle values.
 *
 * @returns the median, or `null` for a list with no numbers.
 */
export function medianOf(values: readonly number[]): number | null {
	const sorted = values.filter((v) => !Number.isNaN(v)).sort((a, b) => a - b);
	if (sorted.length === 0) return null;
	const mid = Math.floor(sorted.length / 2);
	if (sorted.length % 2 === 1) return sorted[mid];
	const [a, b] = [sorted[mid - 1], sorted[mid]];
	return a === b ? a : (a + b) / 2;
}

/**
 * Signed side on which `value` lies outside `reference ± tolerance·|reference|`:
 * `-1` below, `1` above, `0` inside. Infinite values compare as expected (OL against a
 * finite reference is above; a finite value against an OL reference is below).
 */
export function compareToReference(
	value: number,
	reference: number,
	tolerance: number
): -1 | 0 | 1 {
	if (value === reference) return 0;
	if (!Number.isFinite(reference) || !Number.isFinite(value)) return value < reference ? -1 : 1;
	const allowed = tolerance * Math.abs(reference);
	if (value < reference - allowed) return -1;
	if (value > reference + allowed) return 1;
	return 0;
}

/** The median of some positions' values, and the ± of the value(s) it is made of. */
function referenceOf(entries: readonly [string, number][], u: Readonly<Record<string, number>>) {
	const sorted = [...entries].sort((a, b) => a[1] - b[1]);
	const mid = Math.floor(sorted.length / 2);
	const middle = sorted.length % 2 === 1 ? [sorted[mid]] : [sorted[mid - 1], sorted[mid]];
	return {
		value: medianOf(sorted.map(([, v]) => v)) ?? NaN,
		u: Math.max(...middle.map(([k]) => u[k] ?? 0))
	};
}

/**
 * Find the positions whose value deviates from the reference median by more than
 * `tolerance` (a fraction of that median), in the requested direction. The reference is the
 * median of all the values when there are three (the median of the other two would be their
 * mean, which one odd value drags, so the good ones would look off too), and the median of
 * the *other* positions from four on (so the odd one does not pull its own reference).
 * With `uncertainty`, a difference no larger than the combined ± (the value's plus the
 * reference's, the worst-case sum) is never flagged; an OL (`Infinity`) value is compared
 * without it.
 *
 * Values are in any one unit (all the same); `NaN` entries are skipped and not counted.
 * Nothing is flagged when fewer than {@link MIN_VALUES_TO_COMPARE} values remain. A median
 * of zero flags every non-zero value (beyond the ±).
 *
 * @returns the flagged keys, in the object's key order.
 * @throws RangeError for a negative or NaN tolerance.
 */
export function findOutliers(
	valuesByPosition: Readonly<Record<string, number>>,
	{ tolerance, direction, uncertainty = {} }: OutlierOptions
): string[] {
	if (!(tolerance >= 0)) throw new RangeError(`Tolerance must be ≥ 0, got ${tolerance}`);
	const entries = Object.entries(valuesByPosition).filter(([, v]) => !Number.isNaN(v));
	if (entries.length < MIN_VALUES_TO_COMPARE) return [];
	const ofAll = entries.length === MIN_VALUES_TO_COMPARE ? referenceOf(entries, uncertainty) : null;
	return entries
		.filter(([key, value]) => {
			const ref = ofAll ?? referenceOf(entries.filter(([k]) => k !== key), uncertainty);
			const side = compareToReference(value, ref.value, tolerance);
			if (side === 0) return false;
			const finite = Number.isFinite(value) && Number.isFinite(ref.value);
			if (finite && Math.abs(value - ref.value) <= (uncertainty[key] ?? 0) + ref.u) return false;
			return direction === 'both' || (direction === 'low') === side < 0;
		})
		.map(([key]) => key);
}
