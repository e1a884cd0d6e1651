/**
 * The payment provider's webhook: the raw body and its `Stripe-Signature` header go to
 * `applyWebhook` (signature checked, each event once, state only forward). 400 for a wrong
 * signature, 200 otherwise (a repeat or a stale event is answered 200 so the provider stops
 * sending it). No session: the signature is the proof.
 */
import type { RequestHandler } from './$types';
import { applyWebhook, BadSignatureError } from '$lib/server/payments/service';
import { paymentsConfigured } from '$lib/server/payments/provider';
import { errorBody } from '$lib/server/errors';

export const POST: RequestHandler = async ({ request }) => {
	if (!paymentsConfigured()) return Response.json(errorBody('payments_off', 'Payments are not set up'), { status: 503 });
	const raw = await request.text();
	try {
		const outcome = await applyWebhook(raw, request.headers.get('stripe-signature'));
		return Response.json({ received: true, outcome });
	} catch (e) {
		if (e instanceof BadSignatureError) return Response.json(errorBody('bad_signature', 'The signature does not match'), { status: 400 });
		throw e;
	}
};
