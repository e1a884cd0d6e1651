/**
 * The one small interface between Fieldbench and the payment provider, and its
 * implementation on the provider's official Node SDK (`stripe`). Everything else in the app
 * speaks this interface: ask for a hosted payment page for one amount, refund, read a signed
 * webhook. Card numbers are typed on the provider's page, never on ours; we keep its session
 * and payment ids only.
 *
 * Configuration (environment): `STRIPE_SECRET_KEY`, `STRIPE_WEBHOOK_SECRET`, and
 * `PAY_FAKE_URL` to point the SDK at the local fake (scripts/fake-pay.js) instead of the
 * provider. Without a key, card payments are switched off (`paymentsConfigured()`), and
 * cash and bank transfers are still recorded by hand.
 */
import Stripe from 'stripe';

export type CheckoutInput = {
	paymentId: string;
	workshopId: string;
	amountMinor: number;
	currency: string;
	description: string;
	successUrl: string;
	cancelUrl: string;
};

/** A provider event in our words; `kind` `other` is ignored. */
export type PayEvent = {
	id: string;
	created: number;
	type: string;
	kind: 'paid' | 'failed' | 'refunded' | 'expired' | 'other';
	sessionId: string | null;
	paymentRef: string | null;
	paymentId: string | null;
	amountMinor: number | null;
	refundedMinor: number | null;
	currency: string | null;
	failure: string | null;
};

export interface PaymentProvider {
	createCheckout(input: CheckoutInput): Promise<{ sessionId: string; url: string; paymentRef: string | null }>;
	/**
	 * Refund `amountMinor` (part or all of what is left) of a paid payment; `key` is our own
	 * refund's id, sent as the idempotency key so a retried request never refunds twice.
	 */
	refund(paymentRef: string, amountMinor: number, key: string): Promise<{ refundId: string; status: string }>;
	/** Check the signature and read the event; throws `BadSignatureError` otherwise. */
	readWebhook(rawBody: string, signature: string | null): PayEvent;
}

export class BadSignatureError extends Error {}

export function paymentsConfigured(): boolean {
	return Boolean(process.env.STRIPE_SECRET_KEY && process.env.STRIPE_WEBHOOK_SECRET);
}

function sdk(): Stripe {
	const key = process.env.STRIPE_SECRET_KEY;
	if (!key) throw new Error('STRIPE_SECRET_KEY is not set');
	const fake = process.env.PAY_FAKE_URL ? new URL(process.env.PAY_FAKE_URL) : null;
	return new Stripe(key, {
		maxNetworkRetries: 2,
		timeout: 20_000,
		...(fake
			? { host: fake.hostname, port: Number(fake.port || 80), protocol: fake.protocol.replace(':', '') as 'http' | 'https' }
			: {})
	});
}

let cached: Stripe | null = null;
const client = () => (cached ??= sdk());

type Obj = Record<string, unknown> & { metadata?: Record<string, string> };

export const stripeProvider: PaymentProvider = {
	async createCheckout(i) {
		const s = await client().checkout.sessions.create(
			{
				mode: 'payment',
				line_items: [
					{ quantity: 1, price_data: { currency: i.currency.toLowerCase(), unit_amount: i.amountMinor, product_data: { name: i.description } } }
				],
				client_reference_id: i.paymentId,
				metadata: { paymentId: i.paymentId, workshopId: i.workshopId },
				payment_intent_data: { metadata: { paymentId: i.paymentId, workshopId: i.workshopId } },
				success_url: i.successUrl,
				cancel_url: i.cancelUrl
			},
			{ idempotencyKey: `checkout-${i.paymentId}` }
		);
		if (!s.url) throw new Error('The payment provider gave no payment page');
		const pi = typeof s.payment_intent === 'string' ? s.payment_intent : (s.payment_intent?.id ?? null);
		return { sessionId: s.id, url: s.url, paymentRef: pi };
	},
	async refund(paymentRef, amountMinor, key) {
		const r = await client().refunds.create(
			{ payment_intent: paymentRef, amount: amountMinor, metadata: { refundId: key } },
			{ idempotencyKey: `refund-${key}` }
		);
		return { refundId: r.id, status: r.status ?? 'succeeded' };
	},
	readWebhook(rawBody, signature) {
		let ev: Stripe.Event;
		try {
			ev = client().webhooks.constructEvent(rawBody, signature ?? '', process.env.STRIPE_WEBHOOK_SECRET ?? '');
		} catch {
			throw new BadSignatureError('The signature does not match');
		}
		const o = ev.data.object as unknown as Obj;
		const md = o.metadata ?? {};
		const base = {
			id: ev.id,
			created: ev.created,
			type: ev.type,
			paymentId: md.paymentId ?? null,
			currency: typeof o.currency === 'string' ? o.currency.toUpperCase() : null,
			failure: null,
			refundedMinor: null
		};
		switch (ev.type) {
			case 'checkout.session.completed':
				return {
					...base,
					kind: o.payment_status === 'paid' ? 'paid' : 'other',
					sessionId: o.id as string,
					paymentRef: (o.payment_intent as string | null) ?? null,
					amountMinor: Number(o.amount_total)
				};
			case 'checkout.session.expired':
				return { ...base, kind: 'expired', sessionId: o.id as string, paymentRef: null, amountMinor: null };
			case 'payment_intent.payment_failed': {
				const err = o.last_payment_error as { message?: string } | undefined;
				return { ...base, kind: 'failed', sessionId: null, paymentRef: o.id as string, amountMinor: Number(o.amount), failure: err?.message ?? 'The card was declined' };
			}
			case 'charge.refunded':
				return {
					...base,
					kind: 'refunded',
					sessionId: null,
					paymentRef: (o.payment_intent as string | null) ?? null,
					amountMinor: Number(o.amount),
					refundedMinor: Number(o.amount_refunded)
				};
			default:
				return { ...base, kind: 'other', sessionId: null, paymentRef: null, amountMinor: null };
		}
	}
};

let current: PaymentProvider = stripeProvider;
/** The provider in use (tests may swap it; the app always uses the SDK's). */
export const provider = () => current;
export function useProvider(p: PaymentProvider) {
	current = p;
}
