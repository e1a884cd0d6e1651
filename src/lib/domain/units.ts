/**
 * Units: reading what a technician types, converting it to SI base units, and showing a
 * value back in the user's locale. Every value inside the domain is in a base unit:
 * ohms (Ω), volts (V), amperes (A), metres (m) and degrees Celsius (°C).
 */

/** A physical quantity that `formatQuantity` knows how to show. */
export type Quantity = 'resistance' | 'voltage' | 'current' | 'length' | 'temperature';

/** The unit symbols `toBase` understands, after `normalizeUnit`. */
export type Unit = 'mΩ' | 'Ω' | 'kΩ' | 'MΩ' | 'mV' | 'V' | 'kV' | 'mA' | 'A' | 'mm' | 'm' | '°C';

/** Factor from each unit to its base unit (value in base = value × factor). */
export const UNIT_FACTORS: Readonly<Record<Unit, number>> = {
	mΩ: 1e-3,
	Ω: 1,
	kΩ: 1e3,
	MΩ: 1e6,
	mV: 1e-3,
	V: 1,
	kV: 1e3,
	mA: 1e-3,
	A: 1,
	mm: 1e-3,
	m: 1,
	'°C': 1
};

/** Prefixed units offered for display, smallest first, with the base unit of each quantity. */
const DISPLAY_UNITS: Readonly<Record<Quantity, { base: Unit; units: readonly Unit[] }>> = {
	resistance: { base: 'Ω', units: ['mΩ', 'Ω', 'kΩ', 'MΩ'] },
	voltage: { base: 'V', units: ['mV', 'V', 'kV'] },
	current: { base: 'A', units: ['mA', 'A'] },
	length: { base: 'm', units: ['mm', 'm'] },
	temperature: { base: '°C', units: ['°C'] }
};

const DECIMAL_PATTERN = /^[+-]?(\d+([.,]\d*)?|[.,]\d+)$/;

/**
 * Parse a decimal number typed by a person.
 *
 * Accepts an optional sign (`-`, `+` or the typographic minus U+2212), digits, and one decimal
 * separator that may be a point or a comma (`0.4`, `0,4`, `.4`, `4.`), with surrounding
 * whitespace. A comma is always a decimal separator, never a thousands separator.
 *
 * @returns the number, or `null` for empty text, more than one separator (`1.2.3`, `1,2,3`),
 *   words, exponents, `NaN` or `Infinity`.
 */
export function parseDecimal(text: string): number | null {
	const trimmed = text.trim().replace('\u2212', '-');
	if (!DECIMAL_PATTERN.test(trimmed)) return null;
	const value = Number(trimmed.replace(',', '.'));
	return Number.isFinite(value) ? value : null;
}

/**
 * Normalize a unit symbol: the ohm sign U+2126 becomes the Greek capital omega U+03A9, and
 * the words `ohm`/`ohms` in any case (after an optional prefix `m`, `k`, `M`) become `Ω`.
 * Case matters for prefixes (`m` is milli, `M` is mega).
 *
 * @returns the normalized symbol, or `null` when the unit is not one of {@link Unit}.
 */
export function normalizeUnit(unit: string): Unit | null {
	if (Object.hasOwn(UNIT_FACTORS, unit)) return unit as Unit; // already a symbol: unchanged below
	const symbol = unit
		.trim()
		.replace('\u2126', 'Ω')
		.replace(/ohms?$/i, 'Ω');
	return Object.hasOwn(UNIT_FACTORS, symbol) ? (symbol as Unit) : null;
}

/**
 * Convert a value in `unit` to its SI base unit (Ω, V, A, m; °C stays °C).
 *
 * Units come from a fixed picker, so an unknown unit is a programming error: it throws a
 * `RangeError` rather than returning a value that could be mistaken for a reading. Use
 * {@link normalizeUnit} first to test free text.
 *
 * @example toBase(12.28, 'kΩ') === 12280
 * @throws RangeError for an unknown unit.
 */
export function toBase(value: number, unit: string): number {
	const symbol = normalizeUnit(unit);
	if (symbol === null) throw new RangeError(`Unknown unit: "${unit}"`);
	return value * UNIT_FACTORS[symbol];
}

/**
 * Pick the display unit for a base value: the largest prefix that leaves at least 1 in front,
 * except that the base unit is kept down to 0.1 (so 0.4 Ω reads "0.4 Ω", not "400 mΩ").
 */
export function pickDisplayUnit(valueBase: number, quantity: Quantity): Unit {
	const { base, units } = DISPLAY_UNITS[quantity];
	const magnitude = Math.abs(valueBase);
	if (magnitude === 0) return base;
	let chosen = units[0];
	for (const unit of units) {
		const floor = unit === base ? 0.1 : 1;
		if (magnitude / UNIT_FACTORS[unit] >= floor) chosen = unit;
	}
	return chosen;
}

/** Options for {@link formatQuantity}. */
export interface FormatOptions {
	/** BCP 47 locale whose decimal separator is used, e.g. `'de-DE'` shows `0,4`. */
	locale: string;
	/** Significant digits shown (default 3); trailing zeros are dropped. */
	digits?: number;
}

/**
 * Show a value in base units as text with a sensible SI prefix, e.g. `12280, 'resistance'` →
 * `"12.3 kΩ"` (en) or `"12,3 kΩ"` (de). About `digits` (default 3) significant digits, Latin
 * digits, no grouping, a plain space before the unit. The value is rounded before the prefix
 * is chosen, so 999.6 Ω shows as `"1 kΩ"`, never `"1000 Ω"`.
 *
 * Beyond the largest prefix the number simply grows (`"5000 MΩ"`).
 *
 * An over-range reading (`Infinity`) shows as `"OL"` (`"-OL"` when negative); `NaN` as `"—"`.
 */
export function formatQuantity(valueBase: number, quantity: Quantity, opts: FormatOptions): string {
	if (Number.isNaN(valueBase)) return '—';
	if (!Number.isFinite(valueBase)) return valueBase > 0 ? 'OL' : '-OL';
	const digits = opts.digits ?? 3;
	const rounded = Number(valueBase.toPrecision(digits)) || 0; // also turns -0 into 0
	const unit = pickDisplayUnit(rounded, quantity);
	const number = new Intl.NumberFormat(opts.locale, {
		maximumSignificantDigits: digits,
		useGrouping: false,
		numberingSystem: 'latn'
	}).format(rounded / UNIT_FACTORS[unit]);
	return `${number} ${unit}`;
}
