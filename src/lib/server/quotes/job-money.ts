/**
 * A job's quotes and payments as the office pages show them: each quote's state in words
 * (a sent quote whose every link ran out is "Link expired"), its priced lines and totals,
 * its links and the answer (who, when, by link or recorded by hand, and by whom), and the
 * payments with every change of state (who, when).
 */
import { formatMoney, formatRate, type Currency } from '../../money';
import { QUOTE_STATE_LABELS, type QuoteState } from '../../schemas/quote';
import type { Actor } from '../auth/types';
import { User } from '../db/models';
import { paymentsConfigured } from '../payments/provider';
import { paymentsOfJob } from '../payments/service';
import { quotesOfJob } from '../services/quotes';
import { latestLinkState, linksOfQuotes } from './links';
import { readPricing, type PricedLine } from './pricing';

export async function jobMoney(actor: Actor, jobId: string, now = new Date()) {
	const [quotes, payments, pricing] = await Promise.all([quotesOfJob(actor, jobId), paymentsOfJob(actor, jobId), readPricing(actor.workshopId)]);
	const links = await linksOfQuotes(actor, quotes.map((q) => q.id as string));
	const ids = [...new Set(quotes.flatMap((q) => [q.answeredBy, q.createdBy]).filter(Boolean))] as string[];
	const users = ids.length ? await User.findAll({ where: { id: ids, workshopId: actor.workshopId } }) : [];
	const nameOf = (id: unknown) => users.find((u) => u.id === id)?.name ?? 'Former user';
	return {
		paymentsOn: paymentsConfigured(),
		pricingSet: pricing !== null,
		quotes: quotes.map((q) => {
			const cur = (q.currency ?? 'GBP') as Currency;
			const mine = links.filter((l) => l.quoteId === q.id);
			let state = q.state as QuoteState;
			const link = latestLinkState(mine, now);
			if (state === 'sent' && link?.expired) state = 'expired';
			return {
				id: q.id as string,
				version: q.version as number,
				state,
				stateLabel: QUOTE_STATE_LABELS[state],
				madeBy: q.createdBy ? nameOf(q.createdBy) : null,
				madeAt: q.createdAt as Date | null,
				lines: ((q.lines ?? []) as PricedLine[]).map((l) => ({
					text: l.text,
					quantity: l.kind === 'labour' ? `${l.quantityMilli / 1000} h` : String(l.quantityMilli / 1000),
					amount: formatMoney(l.amountMinor, cur)
				})),
				net: formatMoney((q.netMinor as number) ?? 0, cur),
				tax: formatMoney((q.taxMinor as number) ?? 0, cur),
				taxLabel: `Tax at ${formatRate((q.taxRateBp as number) ?? 0)}`,
				total: formatMoney((q.totalMinor as number) ?? 0, cur),
				answer: q.answeredAt
					? {
							decision: q.state as string,
							name: q.answeredName as string,
							at: q.answeredAt as Date,
							via: q.answeredVia as 'link' | 'verbal',
							how: (q.verbalHow as string | null) ?? null,
							recordedBy: q.answeredBy ? nameOf(q.answeredBy) : null
						}
					: null,
				links: mine,
				/** When the latest link ran out, for a quote waiting for a fresh one. */
				linkExpiredAt: state === 'expired' ? (link?.expiresAt ?? null) : null
			};
		}),
		payments
	};
}
