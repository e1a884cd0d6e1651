/**
 * Vehicle identification numbers per 49 CFR Part 565: 17 characters, digits and capital
 * letters except I, O and Q, with a check digit in position 9.
 */

/** Length of a VIN. */
export const VIN_LENGTH = 17;

/** Position (1-based) of the check digit. */
export const CHECK_DIGIT_POSITION = 9;

/** Weight of each position 1–17 in the check digit sum (49 CFR 565; position 9 weighs 0). */
export const VIN_WEIGHTS: readonly number[] = [8, 7, 6, 5, 4, 3, 2, 10, 0, 9, 8, 7, 6, 5, 4, 3, 2];

/** Letters that never appear in a VIN, with the character usually meant. */
const FORBIDDEN_LETTERS: Readonly<Record<string, string>> = { I: '1', O: '0', Q: '0' };

/**
 * Numeric value of each VIN character for the check digit (the 49 CFR 565 transliteration):
 * digits stand for themselves; A–H = 1–8, J–N = 1–5, P = 7, R = 9, S–Z = 2–9.
 */
export const TRANSLITERATION: Readonly<Record<string, number>> = {
	...Object.fromEntries([...'0123456789'].map((d) => [d, Number(d)])),
	...Object.fromEntries([...'ABCDEFGH'].map((c, i) => [c, i + 1])),
	...Object.fromEntries([...'JKLMN'].map((c, i) => [c, i + 1])),
	P: 7,
	R: 9,
	...Object.fromEntries([...'STUVWXYZ'].map((c, i) => [c, i + 2]))
};

/** Uppercase a typed VIN and drop spaces and hyphens people add while reading it out. */
export function normalizeVin(vin: string): string {
	return vin.replace(/[\s-]/g, '').toUpperCase();
}

/**
 * The check digit a VIN should carry: Σ value × weight over the 17 positions, modulo 11,
 * with a remainder of 10 written `X`. The character in position 9 is ignored (weight 0).
 * Input is normalized with {@link normalizeVin}.
 *
 * @returns `'0'`–`'9'` or `'X'`, or `null` when the VIN is not 17 valid characters.
 */
export function vinCheckDigit(vin: string): string | null {
	const chars = [...normalizeVin(vin)];
	if (chars.length !== VIN_LENGTH || chars.some((c) => !Object.hasOwn(TRANSLITERATION, c))) {
		return null;
	}
	const sum = chars.reduce((acc, c, i) => acc + TRANSLITERATION[c] * VIN_WEIGHTS[i], 0);
	const remainder = sum % 11;
	return remainder === 10 ? 'X' : String(remainder);
}

/** Result of {@link validateVin}: `valid` exactly when there are no errors. */
export interface VinValidation {
	valid: boolean;
	/** Problems that make the text not a VIN (length, characters). */
	errors: string[];
	/** Doubts that do not (a check digit that does not match). */
	warnings: string[];
}

/** Readable errors for characters that cannot be in a VIN, naming their positions. */
function findCharacterErrors(chars: readonly string[]): string[] {
	return chars.flatMap((c, i) => {
		if (Object.hasOwn(FORBIDDEN_LETTERS, c)) {
			return [
				`Position ${i + 1}: the letter ${c} is never used in a VIN (${FORBIDDEN_LETTERS[c]}?).`
			];
		}
		if (!Object.hasOwn(TRANSLITERATION, c)) {
			return [`Position ${i + 1}: "${c}" is not a digit or a capital letter.`];
		}
		return [];
	});
}

/**
 * Validate a VIN per 49 CFR Part 565, after {@link normalizeVin}:
 * - error: not 17 characters, or a character outside 0–9 and A–Z, or the letter I, O or Q;
 * - warning: the check digit in position 9 does not match the others (a typo is likely;
 *   vehicles not built for North America need not use a check digit).
 */
export function validateVin(vin: string): VinValidation {
	const chars = [...normalizeVin(vin)];
	const errors = findCharacterErrors(chars);
	if (chars.length !== VIN_LENGTH) {
		errors.unshift(`A VIN has ${VIN_LENGTH} characters; this one has ${chars.length}.`);
	}
	const warnings: string[] = [];
	const expected = errors.length === 0 ? vinCheckDigit(vin) : null;
	const actual = chars[CHECK_DIGIT_POSITION - 1];
	if (expected !== null && actual !== expected) {
		warnings.push(
			`The check digit (position 9) is ${actual} but the other characters give ${expected}: ` +
				'check for a typo. Vehicles not built for North America may not use a check digit.'
		);
	}
	return { valid: errors.length === 0, errors, warnings };
}

/** Position (1-based) of the model-year character. */
export const MODEL_YEAR_POSITION = 10;

/**
 * The model-year codes of 49 CFR 565.15(a), Table VI, in order from 1980 (A) to 2009 (9);
 * the cycle repeats every 30 years (2010 is A again). I, O, Q, U, Z and 0 are never used.
 */
export const MODEL_YEAR_CODES = 'ABCDEFGHJKLMNPRSTVWXY123456789';

/**
 * The character a VIN carries in position 10 for a model year (49 CFR 565.15(a)), e.g.
 * 2019 → `K`, 2022 → `N`.
 *
 * @throws RangeError for a year that is not a whole number from 1980 on.
 */
export function modelYearCode(year: number): string {
	if (!Number.isInteger(year) || year < 1980) throw new RangeError(`No model-year code for ${year}`);
	return MODEL_YEAR_CODES[(year - 1980) % MODEL_YEAR_CODES.length];
}
