/**
 * POST /api/payments/:id/refund { amount: "12.50", reason? } → 201 { refundId, amountMinor,
 * currency }: refund part or all of what is left of a paid payment (the rulebook's
 * `refuseRefund`: leads and owners only, never more than what is left).
 */
import { api, readJson } from '$lib/server/api';
import { actorOf } from '$lib/server/auth/types';
import { refundPayment } from '$lib/server/payments/service';

export const POST = api(async (event, user) => {
	const made = await refundPayment(actorOf(user), event.params.id ?? '', await readJson(event.request));
	return Response.json(made, { status: 201 });
});
