import { error, fail } from '@sveltejs/kit';
import { AppError, ValidationError } from '$lib/server/errors';
import { answerQuoteLink, openQuoteLink } from '$lib/server/quotes/links';
import { askCardPaymentForQuote, PaymentsOffError } from '$lib/server/payments/service';
import { paymentsConfigured } from '$lib/server/payments/provider';
import { db } from '$lib/server/db';
import { QueryTypes } from 'sequelize';
import { formatMoney } from '$lib/money';
import { timeZoneOf } from '$lib/server/services/workshops';

/** The customer's quote by its link; no sign-in (the unguessable token is the key). */
export async function load({ params, setHeaders, url }) {
	setHeaders({ 'cache-control': 'no-store', 'x-robots-tag': 'noindex, nofollow' });
	let q;
	try {
		q = await openQuoteLink(params.token);
	} catch (e) {
		if (e instanceof AppError && (e.status === 404 || e.status === 410)) error(e.status, e.message);
		throw e;
	}
	const timeZone = await timeZoneOf(q.workshopId);
	const [paid] = await db().query<{ n: number; paid: string | number | null; refunded: string | number | null }>(
		`SELECT COUNT(*) AS n, SUM(amount_minor) AS paid, SUM(refunded_minor) AS refunded FROM payments
		 WHERE workshop_id = ? AND quote_id = ? AND state IN ('paid', 'refunded')`,
		{ replacements: [q.workshopId, q.quoteId], type: QueryTypes.SELECT }
	);
	const paidMinor = Number(paid?.paid ?? 0);
	const refundedMinor = Number(paid?.refunded ?? 0);
	return {
		shown: q.shown,
		expiresAt: q.expiresAt.toISOString(),
		timeZone,
		answer: q.answer ? { ...q.answer, at: q.answer.at.toISOString() } : null,
		closed: q.closed,
		paid: Number(paid?.n ?? 0) > 0,
		// What the customer paid and had back, in their receipt's words.
		receipt: refundedMinor
			? { paid: formatMoney(paidMinor, q.shown.currency), refunded: formatMoney(refundedMinor, q.shown.currency), kept: formatMoney(paidMinor - refundedMinor, q.shown.currency) }
			: null,
		canPay: paymentsConfigured() && (q.answer?.decision === 'approved' || q.quoteState === 'approved'),
		back: url.searchParams.get('paid') === '1'
	};
}

export const actions = {
	answer: async ({ params, request }) => {
		const fd = await request.formData();
		const values = { decision: String(fd.get('decision') ?? ''), name: String(fd.get('name') ?? '') };
		try {
			await answerQuoteLink(params.token, values);
			return { answered: values.decision };
		} catch (e) {
			if (e instanceof ValidationError) return fail(400, { errors: e.fields, values });
			if (e instanceof AppError && [404, 409, 410].includes(e.status)) return fail(e.status, { message: e.message, values });
			throw e;
		}
	},
	pay: async ({ params, url }) => {
		try {
			const q = await openQuoteLink(params.token);
			const r = await askCardPaymentForQuote(q.workshopId, q.quoteId, {
				successUrl: `${url.origin}/q/${params.token}?paid=1`,
				cancelUrl: `${url.origin}/q/${params.token}`
			});
			if (r.paid) return { message: 'This quote is already paid. Thank you.' };
			// A link, not a redirect: the page's form-action policy keeps forms on this site.
			return { payUrl: r.url };
		} catch (e) {
			if (e instanceof PaymentsOffError) return fail(503, { message: e.message });
			if (e instanceof AppError && e.status < 500) return fail(e.status, { message: e.message });
			throw e;
		}
	}
};
