/**
 * The phone's quote form: the failed test's part suggested from the price list, the lines
 * and totals the phone shows before sending (worked by hand beside each check; the invented
 * demo prices), and the request it sends (names, never prices).
 */
import { describe, expect, it } from 'vitest';
import { linesOf, linkRanOut, requestOf, suggestedParts, totalsOf, type PhonePricing } from '../../../src/routes/(app)/field/job/[id]/quote/quote-form';

const P: PhonePricing = {
	pricing: { currency: 'GBP', taxRateBp: 2000, labourRateMinor: 6800, diagnosticFeeMinor: 4500 },
	items: [
		{ id: 'coil', kind: 'part', partNumber: 'TB-IC-2041', label: 'Pencil coil', priceMinor: 3840, hoursMilli: null },
		{ id: 'pack', kind: 'part', partNumber: 'QX-CP-3307', label: 'Coil pack', priceMinor: 11200, hoursMilli: null },
		{ id: 'fit', kind: 'labour', partNumber: null, label: 'Fit one coil', priceMinor: 7000, hoursMilli: 300 }
	],
	savedAt: '2026-12-02T10:00:00Z'
};

describe('the phone’s quote form', () => {
	it('suggests the part of a failed test, matching the part number however it was typed', () => {
		expect(suggestedParts(P, [{ partNumber: ' tb-ic-2041 ' }])).toEqual(['coil']);
		expect(suggestedParts(P, [{ partNumber: 'XX-0000' }, { partNumber: null }])).toEqual([]);
		expect(suggestedParts(null, [{ partNumber: 'TB-IC-2041' }])).toEqual([]);
	});

	it('prices labour at the picked item’s rate, or the workshop’s without one', () => {
		const picked = linesOf(P, { parts: [], labourItemId: 'fit', hoursMilli: 500, diagnostic: false });
		expect(picked).toEqual([{ kind: 'labour', text: 'Fit one coil', unitMinor: 7000, quantityMilli: 500 }]);
		const typed = linesOf(P, { parts: [], labourItemId: null, hoursMilli: 1250, diagnostic: false });
		expect(typed[0].unitMinor).toBe(6800);
	});

	it('totals a coil, half an hour and the fee: 38.40 + 34.00 + 45.00 = 117.40, tax 23.48, 140.88 (by hand)', () => {
		const t = totalsOf(P, { parts: ['coil'], labourItemId: null, hoursMilli: 500, diagnostic: true });
		expect([t.netMinor, t.taxMinor, t.totalMinor]).toEqual([11740, 2348, 14088]);
	});

	it('sends what goes on the quote, never a price', () => {
		const r = requestOf({ parts: ['coil'], labourItemId: 'fit', hoursMilli: 300, diagnostic: true }, null);
		expect(r).toEqual({ parts: [{ itemId: 'coil', quantityMilli: 1000 }], labour: [{ itemId: 'fit', hoursMilli: 300 }], diagnostic: true, testId: null });
		expect(JSON.stringify(r)).not.toMatch(/Minor|price/i);
	});

	it('tells that a sent quote’s link ran out from the expiry the phone kept, offline', () => {
		// The link was made 2026-11-25 10:00 UTC and is open 7 days: until 2026-12-02 10:00 UTC.
		const kept = { quoteId: 'q1', expiresAt: '2026-12-02T10:00:00.000Z' };
		const sent = { id: 'q1', state: 'sent' };
		expect(linkRanOut(kept, sent, Date.parse('2026-12-02T09:59:59Z'))).toBe(false);
		expect(linkRanOut(kept, sent, Date.parse('2026-12-02T10:00:00Z'))).toBe(true);
		// Answered or replaced quotes, another quote's link, or none kept: nothing to say.
		expect(linkRanOut(kept, { id: 'q1', state: 'approved' }, Date.parse('2026-12-09T00:00:00Z'))).toBe(false);
		expect(linkRanOut(kept, { id: 'q2', state: 'sent' }, Date.parse('2026-12-09T00:00:00Z'))).toBe(false);
		expect(linkRanOut(null, sent, Date.parse('2026-12-09T00:00:00Z'))).toBe(false);
		expect(linkRanOut({ quoteId: 'q1', expiresAt: 'not a date' }, sent, Date.parse('2026-12-09T00:00:00Z'))).toBe(false);
	});
});
