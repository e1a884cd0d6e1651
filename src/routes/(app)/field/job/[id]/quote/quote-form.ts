/**
 * The phone's quote form, pure: the price list kept from the last time the phone had signal
 * (`/api/pricing`), the part suggested from the failed test, and the totals shown before
 * anything is sent (the server prices the quote again from the same list when it arrives).
 */
import { quoteTotals, type Currency, type QuoteLine } from '$lib/money';

export type PhonePricing = {
	pricing: { currency: Currency; taxRateBp: number; labourRateMinor: number; diagnosticFeeMinor: number } | null;
	items: { id: string; kind: 'part' | 'labour'; partNumber: string | null; label: string; priceMinor: number; hoursMilli: number | null }[];
	savedAt: string;
};

export type Choice = { parts: string[]; labourItemId: string | null; hoursMilli: number; diagnostic: boolean };

/** The parts on the list that match a failed test's part number. */
export function suggestedParts(p: PhonePricing | null, failed: { partNumber: string | null }[]): string[] {
	if (!p) return [];
	const numbers = new Set(failed.map((f) => f.partNumber?.trim().toUpperCase()).filter(Boolean));
	return p.items.filter((i) => i.kind === 'part' && i.partNumber && numbers.has(i.partNumber.trim().toUpperCase())).map((i) => i.id);
}

/** The lines as the server will price them, from the phone's copy of the list. */
export function linesOf(p: PhonePricing, c: Choice): QuoteLine[] {
	const byId = new Map(p.items.map((i) => [i.id, i]));
	const lines: QuoteLine[] = [];
	for (const id of c.parts) {
		const i = byId.get(id);
		if (i) lines.push({ kind: 'part', text: i.label, unitMinor: i.priceMinor, quantityMilli: 1000 });
	}
	if (c.hoursMilli > 0) {
		const i = c.labourItemId ? byId.get(c.labourItemId) : null;
		lines.push({ kind: 'labour', text: i?.label ?? 'Labour', unitMinor: i?.priceMinor ?? p.pricing!.labourRateMinor, quantityMilli: c.hoursMilli });
	}
	if (c.diagnostic) lines.push({ kind: 'diagnostic', text: 'Diagnosis', unitMinor: p.pricing!.diagnosticFeeMinor, quantityMilli: 1000 });
	return lines;
}

export const totalsOf = (p: PhonePricing, c: Choice) => quoteTotals(linesOf(p, c), p.pricing!.taxRateBp);

/** The request the phone sends (names what goes on the quote, never a price). */
export function requestOf(c: Choice, testId: string | null) {
	return {
		parts: c.parts.map((itemId) => ({ itemId, quantityMilli: 1000 })),
		labour: c.hoursMilli > 0 ? [{ itemId: c.labourItemId, hoursMilli: c.hoursMilli }] : [],
		diagnostic: c.diagnostic,
		testId
	};
}

/** The latest link of a quote as the phone keeps it (IndexedDB `meta['quote-link:<id>']`). */
export type KeptLink = { quoteId: string; expiresAt: string };

/**
 * Whether the quote's approval link ran out unanswered, from what the phone keeps (so it
 * can tell offline): only a sent quote, only the link kept for this very quote, and only
 * once its time has come (`now` in ms).
 */
export function linkRanOut(kept: KeptLink | null, quote: { id: string; state: unknown } | null, now: number): boolean {
	if (!kept || !quote || quote.state !== 'sent' || kept.quoteId !== quote.id) return false;
	const end = Date.parse(kept.expiresAt);
	return Number.isFinite(end) && end <= now;
}
