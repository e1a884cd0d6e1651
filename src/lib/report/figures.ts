/**
 * Figures as a customer reads them: a value in the unit of the maker's figure ("19.2 kΩ"),
 * the maker's figure itself ("8.8 to 14.6 kΩ, engine cold"), never a code. Pure.
 */
import { normalizeUnit, UNIT_FACTORS } from '../domain/units';
import type { CheckFacts } from './types';

const NUMBER = new Intl.NumberFormat('en-GB', {
	maximumSignificantDigits: 3,
	useGrouping: false,
	numberingSystem: 'latn'
});

/** A number in the unit given (3 significant digits, point decimal, a typographic minus). */
export function numberIn(valueBase: number, unit: string | null): string {
	const symbol = unit ? normalizeUnit(unit) : null;
	const factor = symbol ? UNIT_FACTORS[symbol] : 1;
	const v = Number((valueBase / factor).toPrecision(3)) || 0;
	return NUMBER.format(v).replace('-', '\u2212');
}

/** "19.2 kΩ"; an over-range reading is "open circuit"; no value is "not read". */
export function valueText(valueBase: number | null, unit: string | null): string {
	if (valueBase === null || Number.isNaN(valueBase)) return 'not read';
	if (valueBase === Infinity) return 'open circuit';
	if (valueBase === -Infinity) return 'below the meter’s range';
	return unit ? `${numberIn(valueBase, unit)} ${normalizeUnit(unit) ?? unit}` : numberIn(valueBase, null);
}

/** A band's temperature in words: "engine cold", "engine hot", "20 to 40 °C", "any temperature". */
export function bandWhen(b: { fromC: number | null; toC: number | null }): string {
	if (b.fromC === null && b.toC === null) return '';
	if (b.fromC === null && b.toC !== null && b.toC <= 50) return `engine cold, below ${b.toC} °C`;
	if (b.fromC !== null && b.fromC >= 50)
		return b.toC === null ? `engine hot, ${b.fromC} °C and above` : `engine hot, ${b.fromC} to ${b.toC} °C`;
	if (b.fromC === null) return `below ${b.toC} °C`;
	if (b.toC === null) return `${b.fromC} °C and above`;
	return `${b.fromC} to ${b.toC} °C`;
}

/** The limits of one band in the check's unit: "8.8 to 14.6 kΩ", "at least 12 V", "at most 0.2 V". */
export function limitsText(b: { min: number | null; max: number | null }, unit: string | null): string {
	const u = unit ? ` ${normalizeUnit(unit) ?? unit}` : '';
	if (b.min !== null && b.max !== null) return `${numberIn(b.min, unit)} to ${numberIn(b.max, unit)}${u}`;
	if (b.min !== null) return `at least ${numberIn(b.min, unit)}${u}`;
	if (b.max !== null) return `at most ${numberIn(b.max, unit)}${u}`;
	return 'no limit given';
}

/**
 * The maker's figure a reading was judged against: the bands it was judged with (both when
 * the temperature was not certain), each with its temperature.
 */
export function specText(check: CheckFacts, judged: { fromC: number | null; toC: number | null }[]): string {
	const bands = judged
		.map((j) => check.bands.find((b) => b.fromC === j.fromC && b.toC === j.toC))
		.filter((b): b is CheckFacts['bands'][number] => b !== undefined);
	const list = bands.length ? bands : check.bands;
	if (!list.length) return 'no maker’s figure on file';
	return list
		.map((b) => {
			const when = bandWhen(b);
			return when ? `${limitsText(b, check.unit)} (${when})` : limitsText(b, check.unit);
		})
		.join('; or ');
}
