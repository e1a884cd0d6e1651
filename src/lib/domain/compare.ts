/**
 * Odd-one-out: compare the same measurement across positions (cylinders, coils, injectors)
 * when the maker gives no spec, or as a second opinion beside it.
 */

/** Which deviations `findOutliers` reports. */
export type OutlierDirection = 'low' | 'high' | 'both';

/** Options for {@link findOutliers}. */
export interface OutlierOptions {
	/** Allowed deviation as a fraction of the median of the other values (0.1 = 10 %), ≥ 0. */
	tolerance: number;
	/** Report only values below (`low`), above (`high`) or on either side (`both`). */
	direction: OutlierDirection;
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

/**
 * Find the positions whose value deviates from the median of the *other* positions by more
 * than `tolerance` (a fraction of that median), in the requested direction.
 *
 * Values are in any one unit (all the same); `NaN` entries are skipped and not counted.
 * Nothing is flagged when fewer than {@link MIN_VALUES_TO_COMPARE} values remain. A median
 * of zero flags every non-zero value. With exactly three values the median of the other two
 * is their mean, so one outlier can make its neighbours look off too (direction `both`).
 *
 * @returns the flagged keys, in the object's key order.
 * @throws RangeError for a negative or NaN tolerance.
 */
export function findOutliers(
	valuesByPosition: Readonly<Record<string, number>>,
	{ tolerance, direction }: OutlierOptions
): string[] {
	if (!(tolerance >= 0)) throw new RangeError(`Tolerance must be ≥ 0, got ${tolerance}`);
	const entries = Object.entries(valuesByPosition).filter(([, v]) => !Number.isNaN(v));
	if (entries.length < MIN_VALUES_TO_COMPARE) return [];
	return entries
		.filter(([key, value]) => {
			const others = entries.filter(([k]) => k !== key).map(([, v]) => v);
			const side = compareToReference(value, medianOf(others) ?? value, tolerance);
			if (side === 0) return false;
			return direction === 'both' || (direction === 'low') === side < 0;
		})
		.map(([key]) => key);
}
