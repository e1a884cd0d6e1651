import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import {
	modelYearCode,
	normalizeVin,
	TRANSLITERATION,
	validateVin,
	VIN_WEIGHTS,
	vinCheckDigit
} from '$lib/domain/vin';

const VIN_CHARACTERS = [...'0123456789ABCDEFGHJKLMNPRSTUVWXYZ'];

describe('the 49 CFR Part 565 tables', () => {
	it('weighs positions 1–17 as 8,7,6,5,4,3,2,10,0,9,8,7,6,5,4,3,2', () => {
		expect(VIN_WEIGHTS).toEqual([8, 7, 6, 5, 4, 3, 2, 10, 0, 9, 8, 7, 6, 5, 4, 3, 2]);
	});

	it('transliterates every letter allowed in a VIN as the regulation tabulates it', () => {
		const letters = 'A1 B2 C3 D4 E5 F6 G7 H8 J1 K2 L3 M4 N5 P7 R9 S2 T3 U4 V5 W6 X7 Y8 Z9';
		const table = Object.fromEntries(letters.split(' ').map((p) => [p[0], Number(p[1])]));
		expect(
			Object.fromEntries(Object.entries(TRANSLITERATION).filter(([c]) => /[A-Z]/.test(c)))
		).toEqual(table);
	});

	it('has no value for I, O or Q', () => {
		expect(['I', 'O', 'Q'].filter((c) => c in TRANSLITERATION)).toEqual([]);
	});
});

describe('vinCheckDigit', () => {
	it.each([
		// Worked example of the Wikipedia article "Vehicle identification number":
		// products 8 28 48 35 16 12 18 10 0 18 56 0 24 10 28 24 16, sum 351, 351 mod 11 = 10 → X.
		['1M8GDM9AXKP042788', 'X'],
		// Worked example of the blog post "Mathematics in action: vehicle identification
		// numbers" (Scientific Gems, 2018): sum 186, 186 mod 11 = 10 → X.
		['LJCPCBLCX11000237', 'X'],
		// By hand: every value 1, so the sum is the sum of the weights, 89; 89 mod 11 = 1.
		['11111111111111111', '1'],
		// By hand: every value 0, sum 0.
		['00000000000000000', '0'],
		// Invented, by hand: values 3 6 2 5 4 9 3 7 · 9 2 2 0 4 8 1 6; products
		// 24 42 12 25 16 27 6 70 0 81 16 14 0 20 32 3 12; sum 400; 400 mod 11 = 4.
		['3FB5DRT74ZK204816', '4'],
		// Invented, by hand: values 7 8 3 2 5 5 4 4 · 7 8 7 6 0 0 3 1; products
		// 56 56 18 10 20 15 8 40 0 63 64 49 36 0 0 9 2; sum 446; 446 mod 11 = 6.
		['7HL2NE4U6PY760031', '6']
	])('gives %s the check digit %s', (vin, expected) => {
		expect(vinCheckDigit(vin)).toBe(expected);
	});

	it('ignores the character in position 9 (weight 0)', () => {
		expect(vinCheckDigit('1M8GDM9A0KP042788')).toBe('X');
	});

	it('reads lowercase and spaced input', () => {
		expect(vinCheckDigit(' 1m8gdm9a xkp 042788 ')).toBe('X');
	});

	it.each([['1M8GDM9AXKP04278'], ['1M8GDM9AXKP0427888'], ['1M8GDM9AXKP0427O8'], ['']])(
		'gives null for %j, which is not 17 VIN characters',
		(vin) => {
			expect(vinCheckDigit(vin)).toBeNull();
		}
	);
});

describe('normalizeVin', () => {
	it('uppercases and drops spaces and hyphens', () => {
		expect(normalizeVin(' 1m8-gdm9a xkp042788\n')).toBe('1M8GDM9AXKP042788');
	});
});

describe('validateVin', () => {
	it('accepts the published worked example with no errors or warnings', () => {
		expect(validateVin('1M8GDM9AXKP042788')).toEqual({ valid: true, errors: [], warnings: [] });
	});

	it('warns, but stays valid, when the check digit does not match', () => {
		const result = validateVin('1M8GDM9A5KP042788');
		expect(result.valid).toBe(true);
		expect(result.warnings).toHaveLength(1);
	});

	it('names position 9, the digit found and the digit expected in the warning', () => {
		const [warning] = validateVin('1M8GDM9A5KP042788').warnings;
		expect(warning).toMatch(/position 9\) is 5 but the other characters give X/);
	});

	it.each([
		['1M8GDM9AXKP04278', 16],
		['1M8GDM9AXKP0427888', 18],
		['', 0]
	])('rejects %j for its length (%d characters)', (vin, length) => {
		const result = validateVin(vin);
		expect(result.valid).toBe(false);
		expect(result.errors[0]).toBe(`A VIN has 17 characters; this one has ${length}.`);
	});

	it.each([
		['1M8GDM9AXKP0427O8', 16, 'O'],
		['IM8GDM9AXKP042788', 1, 'I'],
		['1M8GDM9AXKQ042788', 11, 'Q']
	])('rejects %j for the letter in position %d', (vin, position, letter) => {
		const result = validateVin(vin);
		expect(result.valid).toBe(false);
		expect(result.errors).toEqual([
			expect.stringMatching(new RegExp(`^Position ${position}: the letter ${letter} is never used`))
		]);
	});

	it('rejects punctuation and names its position', () => {
		expect(validateVin('1M8GDM9AXKP04278#').errors).toEqual([
			'Position 17: "#" is not a digit or a capital letter.'
		]);
	});

	it('reports the length and every bad character together', () => {
		expect(validateVin('OM8GDM9AXKP0427Q').errors).toHaveLength(3);
	});

	it('does not check the digit of a text that has errors', () => {
		expect(validateVin('1M8GDM9A5KP04278').warnings).toEqual([]);
	});
});

describe('validateVin, properties', () => {
	/** A VIN with a correct check digit, built from 16 random VIN characters. */
	const validVin = fc
		.array(fc.constantFrom(...VIN_CHARACTERS), { minLength: 16, maxLength: 16 })
		.map((chars) => {
			const draft = [...chars.slice(0, 8), '0', ...chars.slice(8)].join('');
			return draft.slice(0, 8) + vinCheckDigit(draft) + draft.slice(9);
		});

	it('accepts any VIN built with its own check digit without a warning', () => {
		fc.assert(
			fc.property(validVin, (vin) => {
				expect(validateVin(vin)).toEqual({ valid: true, errors: [], warnings: [] });
			})
		);
	});

	it('detects one character replaced by one of another value (any other at position 9)', () => {
		const position = fc.integer({ min: 0, max: 16 });
		const replacement = fc.constantFrom(...VIN_CHARACTERS);
		fc.assert(
			fc.property(validVin, position, replacement, (vin, i, c) => {
				const changed = i === 8 ? c !== vin[i] : TRANSLITERATION[c] !== TRANSLITERATION[vin[i]];
				fc.pre(changed);
				const typo = vin.slice(0, i) + c + vin.slice(i + 1);
				expect(validateVin(typo).warnings).toHaveLength(1);
			})
		);
	});
});

describe('modelYearCode (49 CFR 565.15(a), the model-year table for position 10)', () => {
	it.each([
		[1980, 'A'],
		[2000, 'Y'],
		[2001, '1'],
		[2009, '9'],
		[2010, 'A'],
		[2016, 'G'],
		[2018, 'J'],
		[2019, 'K'],
		[2022, 'N'],
		[2023, 'P'],
		[2024, 'R'],
		[2030, 'Y']
	])('gives %d the code %s', (year, code) => {
		expect(modelYearCode(year)).toBe(code);
	});

	it('never uses I, O, Q, U, Z or 0', () => {
		const codes = Array.from({ length: 30 }, (_, i) => modelYearCode(1980 + i)).join('');
		expect(codes).not.toMatch(/[IOQUZ0]/);
	});

	it.each([[1979], [2019.5]])('has no code for %d', (year) => {
		expect(() => modelYearCode(year)).toThrow(RangeError);
	});
});
