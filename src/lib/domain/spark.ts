/**
 * Spark gap: a rough estimate of the voltage needed to jump a gap in air, from Paschen's law
 * for a uniform field. Gap in metres, pressure in pascals, result in volts.
 */

/** One torr in pascals: 101 325 Pa / 760 (exact by definition). */
export const PA_PER_TORR = 101325 / 760;

/** Standard atmospheric pressure, Pa. */
export const STANDARD_PRESSURE_PA = 101325;

/**
 * Paschen constants for air in SI units, from Raizer, *Gas Discharge Physics* (Springer,
 * 1991), Table 4.1: A = 15 /(cm·Torr), B = 365 V/(cm·Torr), fitted for E/p of about
 * 100–800 V/(cm·Torr); with the secondary-emission coefficient γ = 0.01 commonly used with
 * them (as in the Wikipedia article "Paschen's law"). 1 cm·Torr = 0.01 m × 133.322 Pa.
 */
export const PASCHEN_AIR = {
	/** Saturation ionization, 1/(Pa·m): 15 / (0.01 · 133.322…) ≈ 11.25. */
	a: 15 / (0.01 * PA_PER_TORR),
	/** Excitation and ionization energies, V/(Pa·m): 365 / (0.01 · 133.322…) ≈ 273.8. */
	b: 365 / (0.01 * PA_PER_TORR),
	/** Secondary electron emission coefficient at the cathode (dimensionless). */
	gamma: 0.01
} as const;

/** Paschen constants of a gas, in SI units (see {@link PASCHEN_AIR}). */
export interface PaschenConstants {
	a: number;
	b: number;
	gamma: number;
}

/**
 * Estimate the breakdown voltage of a gap from Paschen's law:
 * `V = B·p·d / (ln(A·p·d) − ln(ln(1 + 1/γ)))`.
 *
 * A rough estimate only: the law assumes a uniform field between flat electrodes, while a
 * spark plug's or a needle tester's field is not uniform, and at a millimetre gap in air at
 * atmospheric pressure E/p is below the range the constants were fitted for; it is shown
 * as "≈ kV" with that caveat. Depends only on the product p·d (Paschen's similarity law).
 *
 * @param gapM gap in metres, > 0.
 * @param pressurePa gas pressure in pascals, > 0 (default standard atmosphere, 101 325 Pa).
 * @returns volts; `Infinity` when p·d is at or left of the curve's asymptote, where the law
 *   predicts no breakdown.
 * @throws RangeError for a gap or pressure that is not positive.
 */
export function breakdownVoltage(
	gapM: number,
	pressurePa: number = STANDARD_PRESSURE_PA,
	gas: PaschenConstants = PASCHEN_AIR
): number {
	if (!(gapM > 0)) throw new RangeError(`Gap must be > 0 m, got ${gapM}`);
	if (!(pressurePa > 0)) throw new RangeError(`Pressure must be > 0 Pa, got ${pressurePa}`);
	const pd = pressurePa * gapM;
	const denominator = Math.log(gas.a * pd) - Math.log(Math.log(1 + 1 / gas.gamma));
	return denominator > 0 ? (gas.b * pd) / denominator : Infinity;
}

/**
 * The minimum of the Paschen curve, from setting dV/d(pd) = 0:
 * `pd_min = e · ln(1 + 1/γ) / A` (Pa·m) and `V_min = B · pd_min` (V).
 */
export function paschenMinimum(gas: PaschenConstants = PASCHEN_AIR): { pd: number; volts: number } {
	const pd = (Math.E * Math.log(1 + 1 / gas.gamma)) / gas.a;
	return { pd, volts: gas.b * pd };
}
