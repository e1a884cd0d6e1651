/**
 * Limits between a check's unit (what people type and read) and the base units the library
 * stores (Ω, V, A, m). Values are kept to 12 significant digits both ways, so a figure typed
 * as 8.8 kΩ is stored as 8800 Ω and shown again as 8.8 — never 8800.000000000001.
 */
import { normalizeUnit, UNIT_FACTORS } from '../domain/units';

const SIGNIFICANT = 12;
const round = (n: number) => Number(n.toPrecision(SIGNIFICANT));

/** The factor of `unit` to its base unit; 1 for no unit or one the domain does not know. */
export function unitFactor(unit: string | null | undefined): number {
	const u = unit ? normalizeUnit(unit) : null;
	return u ? UNIT_FACTORS[u] : 1;
}

/** A value typed in `unit` → base units (12 significant digits). */
export function limitToBase(value: number, unit: string | null | undefined): number {
	return round(value * unitFactor(unit));
}

/** A stored base value → the number shown in `unit` (12 significant digits). */
export function limitFromBase(base: number, unit: string | null | undefined): number {
	return round(base / unitFactor(unit));
}

const PLAIN = new Intl.NumberFormat('en-US', {
	useGrouping: false,
	maximumSignificantDigits: SIGNIFICANT
});

/** A number as plain decimal text without exponent or grouping; `decimalComma` writes 0,38. */
export function plainNumber(n: number, decimalComma = false): string {
	const s = PLAIN.format(n).replace('\u2212', '-');
	return decimalComma ? s.replace('.', ',') : s;
}
