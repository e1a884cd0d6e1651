/**
 * Money in integer minor units (cents, pence): never floating point. Amounts are plain
 * integers kept within `Number.MAX_SAFE_INTEGER`; products and quotients go through BigInt
 * so that no intermediate value loses a digit. Rounding is half away from zero (the usual
 * commercial rule: 0.5 of a minor unit goes up, −0.5 goes down).
 *
 * Tax rates are whole basis points (1 bp = 0.01 %: 20 % is 2000, 8.25 % is 825). A quote's
 * tax is worked out once on its net total (not per line), then rounded.
 */

/** Currencies the workshop may price in, with their minor units (ISO 4217). */
export const CURRENCIES = { GBP: 2, EUR: 2, USD: 2, AUD: 2, NZD: 2, CAD: 2, JPY: 0 } as const;
export type Currency = keyof typeof CURRENCIES;

function assertAmount(n: number, what = 'amount'): void {
	if (!Number.isSafeInteger(n)) throw new RangeError(`${what} must be a whole number of minor units`);
}

/** a / b rounded half away from zero (b > 0), in BigInt. */
export function divRoundHalfAway(a: bigint, b: bigint): bigint {
	if (b <= 0n) throw new RangeError('divisor must be positive');
	const neg = a < 0n;
	const abs = neg ? -a : a;
	const q = (abs * 2n + b) / (2n * b);
	return neg ? -q : q;
}

function toSafe(b: bigint): number {
	if (b > BigInt(Number.MAX_SAFE_INTEGER) || b < -BigInt(Number.MAX_SAFE_INTEGER))
		throw new RangeError('amount too large');
	return Number(b);
}

/** Sum of amounts in minor units. */
export function sum(amounts: readonly number[]): number {
	let s = 0n;
	for (const a of amounts) {
		assertAmount(a);
		s += BigInt(a);
	}
	return toSafe(s);
}

/**
 * A price times a quantity given in thousandths (labour hours 1.5 → 1500, three parts → 3000),
 * rounded half away from zero to a minor unit.
 */
export function times(unitMinor: number, quantityMilli: number): number {
	assertAmount(unitMinor, 'price');
	assertAmount(quantityMilli, 'quantity');
	return toSafe(divRoundHalfAway(BigInt(unitMinor) * BigInt(quantityMilli), 1000n));
}

/** Tax on a net amount at `rateBp` basis points (2000 = 20 %), rounded half away from zero. */
export function taxOn(netMinor: number, rateBp: number): number {
	assertAmount(netMinor);
	if (!Number.isInteger(rateBp) || rateBp < 0 || rateBp > 10000)
		throw new RangeError('tax rate must be 0–100 % in whole basis points');
	return toSafe(divRoundHalfAway(BigInt(netMinor) * BigInt(rateBp), 10000n));
}

/** Parse a typed amount ("12.5", "1,234.50", "12") into minor units; null when not a price. */
export function parseAmount(text: string, currency: Currency): number | null {
	const digits = CURRENCIES[currency];
	const t = text.trim().replace(/[\s,]/g, '');
	const m = /^(\d{1,12})(?:\.(\d*))?$/.exec(t);
	if (!m) return null;
	const frac = m[2] ?? '';
	if (frac.length > digits) return null;
	const minor = BigInt(m[1]) * 10n ** BigInt(digits) + BigInt((frac + '0'.repeat(digits)).slice(0, digits) || '0');
	return minor > BigInt(Number.MAX_SAFE_INTEGER) ? null : Number(minor);
}

/** Parse hours ("1.5", "0.25") into thousandths; null when not a time. */
export function parseHours(text: string): number | null {
	const m = /^(\d{1,3})(?:\.(\d{0,3}))?$/.exec(text.trim());
	if (!m) return null;
	return Number(m[1]) * 1000 + Number(((m[2] ?? '') + '000').slice(0, 3));
}

/** A percentage typed as "20" or "8.75" into basis points; null when not a rate. */
export function parseRate(text: string): number | null {
	const m = /^(\d{1,3})(?:\.(\d{0,2}))?$/.exec(text.trim());
	if (!m) return null;
	const bp = Number(m[1]) * 100 + Number(((m[2] ?? '') + '00').slice(0, 2));
	return bp <= 10000 ? bp : null;
}

/** Minor units as a plain decimal string ("1234.50"), no symbol. */
export function toDecimal(minor: number, currency: Currency): string {
	assertAmount(minor);
	const digits = CURRENCIES[currency];
	const neg = minor < 0;
	const s = String(Math.abs(minor)).padStart(digits + 1, '0');
	const whole = digits ? s.slice(0, -digits) : s;
	const frac = digits ? '.' + s.slice(-digits) : '';
	return (neg ? '-' : '') + whole + frac;
}

/** Minor units in the workshop's currency as people read it ("£1,234.50"). */
export function formatMoney(minor: number, currency: Currency, locale = 'en-GB'): string {
	const digits = CURRENCIES[currency];
	// Intl takes a decimal string exactly (no float rounding) from the string form.
	return new Intl.NumberFormat(locale, {
		style: 'currency',
		currency,
		minimumFractionDigits: digits,
		maximumFractionDigits: digits
	}).format(toDecimal(minor, currency) as unknown as number);
}

/** Basis points as a percentage for people ("20 %", "8.75 %"). */
export function formatRate(bp: number): string {
	const whole = Math.trunc(bp / 100);
	const frac = String(bp % 100).padStart(2, '0').replace(/0+$/, '');
	return `${whole}${frac ? '.' + frac : ''} %`;
}

export type QuoteLine = {
	kind: 'part' | 'labour' | 'diagnostic' | 'other';
	text: string;
	/** Price of one unit (a part) or one hour (labour), minor units, before tax. */
	unitMinor: number;
	/** Quantity in thousandths (1 part = 1000; 1.5 h = 1500). */
	quantityMilli: number;
};

export type QuoteTotals = {
	lines: (QuoteLine & { amountMinor: number })[];
	netMinor: number;
	taxMinor: number;
	totalMinor: number;
};

/** A quote's line amounts, net, tax (on the net, once) and total. */
export function quoteTotals(lines: readonly QuoteLine[], rateBp: number): QuoteTotals {
	const priced = lines.map((l) => ({ ...l, amountMinor: times(l.unitMinor, l.quantityMilli) }));
	const netMinor = sum(priced.map((l) => l.amountMinor));
	const taxMinor = taxOn(netMinor, rateBp);
	return { lines: priced, netMinor, taxMinor, totalMinor: sum([netMinor, taxMinor]) };
}
