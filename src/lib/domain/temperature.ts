/**
 * Temperature and winding resistance: a metal conductor's resistance is, to a good
 * approximation, proportional to (T₀ + t), where T₀ is the conductor's inferred
 * zero-resistance temperature in °C. Resistances in ohms, temperatures in °C.
 */

/** Copper's inferred zero-resistance temperature, °C (IEEE Std 118, IEEE C57.12.90). */
export const COPPER_INFERRED_ZERO_C = 234.5;
/** Copper's inferred zero-resistance temperature as IEC 60076-1 rounds it, °C. */
export const COPPER_INFERRED_ZERO_C_IEC = 235;
/** Aluminium's inferred zero-resistance temperature, °C (IEEE Std 118, IEEE C57.12.90). */
export const ALUMINIUM_INFERRED_ZERO_C = 225;

/** A conductor by name, or any conductor by its inferred zero-resistance temperature (°C). */
export type Conductor = 'copper' | 'aluminium' | { inferredZeroC: number };

/** The inferred zero-resistance temperature T₀ of a conductor, in °C (a positive number). */
export function inferredZeroOf(material: Conductor): number {
	if (material === 'copper') return COPPER_INFERRED_ZERO_C;
	if (material === 'aluminium') return ALUMINIUM_INFERRED_ZERO_C;
	return material.inferredZeroC;
}

/** Throw unless `tempC` lies above −T₀, where (T₀ + t) and so the resistance is positive. */
function assertAboveInferredZero(tempC: number, inferredZero: number): void {
	if (!(tempC > -inferredZero)) {
		throw new RangeError(`Temperature ${tempC} °C is not above −${inferredZero} °C`);
	}
}

/**
 * The conductor's temperature coefficient of resistance at `tempC`, per kelvin:
 * α(t) = 1 / (T₀ + t). For copper at 20 °C, 1 / 254.5 ≈ 0.00393 /K.
 *
 * @throws RangeError when `tempC` ≤ −T₀.
 */
export function temperatureCoefficientAt(tempC: number, material: Conductor = 'copper'): number {
	const t0 = inferredZeroOf(material);
	assertAboveInferredZero(tempC, t0);
	return 1 / (t0 + tempC);
}

/**
 * Correct a resistance measured at `fromC` to what it would be at `toC`:
 * `r · (T₀ + toC) / (T₀ + fromC)`. Ohms in, ohms out; OL (`Infinity`) stays OL.
 *
 * @param material `'copper'` (T₀ = 234.5 °C), `'aluminium'` (225 °C), or
 *   `{ inferredZeroC }` for another constant, e.g. 235 for IEC 60076-1.
 * @throws RangeError when either temperature is at or below −T₀.
 */
export function correctResistance(
	r: number,
	fromC: number,
	toC: number,
	material: Conductor = 'copper'
): number {
	const t0 = inferredZeroOf(material);
	assertAboveInferredZero(fromC, t0);
	assertAboveInferredZero(toC, t0);
	return (r * (t0 + toC)) / (t0 + fromC);
}

/**
 * The resistance method: the average temperature of a winding from its resistance `r` now
 * and its resistance `rRef` at a known temperature `refC`:
 * `t = (r / rRef) · (T₀ + refC) − T₀`. Resistances in ohms (`rRef` > 0), result in °C.
 *
 * @throws RangeError when `rRef` is not positive or `refC` ≤ −T₀.
 */
export function windingTemperature(
	rRef: number,
	refC: number,
	r: number,
	material: Conductor = 'copper'
): number {
	if (!(rRef > 0)) throw new RangeError(`Reference resistance must be > 0, got ${rRef}`);
	const t0 = inferredZeroOf(material);
	assertAboveInferredZero(refC, t0);
	return (r / rRef) * (t0 + refC) - t0;
}

/** A temperature range `[fromC, toC)` in °C; a `null` bound is unbounded on that side. */
export interface TemperatureRange {
	fromC: number | null;
	toC: number | null;
}

/** Whether `tempC` lies in the half-open range `[fromC, toC)`. `NaN` lies in none. */
export function isInRange({ fromC, toC }: TemperatureRange, tempC: number): boolean {
	if (Number.isNaN(tempC)) return false;
	return (fromC === null || tempC >= fromC) && (toC === null || tempC < toC);
}

/**
 * The first band whose half-open range `[fromC, toC)` contains `tempC` (°C). At an exact
 * boundary the band starting there wins (50 °C is "hot" for a cold band `[null, 50)` and a
 * hot band `[50, 100)`).
 *
 * @returns the band, or `null` when none contains `tempC` (or it is `NaN`).
 */
export function bandFor<B extends TemperatureRange>(bands: readonly B[], tempC: number): B | null {
	return bands.find((band) => isInRange(band, tempC)) ?? null;
}
