/**
 * A quote's fields as a client sends them (phone, office, sync) and the price list's. The
 * client names what goes on the quote — parts from the price list, labour hours, whether the
 * diagnostic fee is in — never a price: the server prices it from the workshop's list and
 * rate (`server/quotes/pricing.ts`). Prices and rates typed by leads are minor units and
 * basis points.
 */
import { z } from 'zod';
import { CURRENCIES } from '../money';
import { patchOf, requiredText } from './common';

const milli = (max: number, what: string) =>
	z
		.number({ error: `A ${what}` })
		.int(`A ${what} in thousandths`)
		.min(1, `More than nothing`)
		.max(max, `At most ${max / 1000}`);

export const quoteRequest = z.object({
	parts: z
		.array(z.object({ itemId: z.uuid('Not a valid part'), quantityMilli: milli(100_000, 'quantity') }))
		.max(20, 'At most 20 parts')
		.default([]),
	labour: z
		.array(
			z.object({
				itemId: z.uuid('Not a valid labour item').nullable().default(null),
				hoursMilli: milli(100_000, 'time in hours')
			})
		)
		.max(10, 'At most 10 labour lines')
		.default([]),
	diagnostic: z.boolean().default(true),
	/** The failed test the quote answers (for the page's words). */
	testId: z.uuid().nullable().default(null)
});
export type QuoteRequest = z.output<typeof quoteRequest>;

export const VERBAL_DECISIONS = ['approved', 'declined'] as const;

export const quoteCreate = z.object({
	jobId: z.uuid('Not a valid job'),
	request: quoteRequest,
	verbalName: z.string().trim().max(120).nullable().optional(),
	verbalHow: z.string().trim().max(200).nullable().optional(),
	verbalDecision: z.enum(VERBAL_DECISIONS).nullable().optional()
});
export const quotePatch = patchOf(quoteCreate.omit({ jobId: true }));

export const QUOTE_STATES = ['draft', 'sent', 'approved', 'declined', 'expired', 'replaced'] as const;
export type QuoteState = (typeof QUOTE_STATES)[number];

/** The words shown for each state of a quote. */
export const QUOTE_STATE_LABELS: Record<QuoteState, string> = {
	draft: 'Not sent yet',
	sent: 'Sent — waiting for the customer',
	approved: 'Approved',
	declined: 'Declined',
	expired: 'Link expired',
	replaced: 'Replaced by a newer quote'
};

/** The workshop's pricing as a lead sets it on /pricing. */
export const pricingInput = z.object({
	currency: z.enum(Object.keys(CURRENCIES) as [keyof typeof CURRENCIES, ...(keyof typeof CURRENCIES)[]], {
		error: 'Pick a currency'
	}),
	taxRateBp: z.number({ error: 'Type the tax rate, e.g. 20' }).int().min(0, 'At least 0 %').max(10000, 'At most 100 %'),
	labourRateMinor: z.number({ error: 'Type the hourly labour rate' }).int().min(0).max(1_000_000_00),
	diagnosticFeeMinor: z.number({ error: 'Type the diagnostic fee' }).int().min(0).max(1_000_000_00)
});
export type PricingInput = z.output<typeof pricingInput>;

export const priceItemInput = z
	.object({
		kind: z.enum(['part', 'labour'], { error: 'Part or labour' }),
		partNumber: z.string().trim().max(60).nullable().default(null),
		label: requiredText(200, 'Say what it is'),
		priceMinor: z.number({ error: 'Type the price' }).int().min(0).max(1_000_000_00),
		hoursMilli: z.number().int().min(1).max(100_000).nullable().default(null)
	})
	.superRefine((v, ctx) => {
		if (v.kind === 'part' && !v.partNumber)
			ctx.addIssue({ code: 'custom', path: ['partNumber'], message: 'Type the part number' });
		if (v.kind === 'labour' && !v.hoursMilli)
			ctx.addIssue({ code: 'custom', path: ['hoursMilli'], message: 'Type the usual time in hours' });
	});
