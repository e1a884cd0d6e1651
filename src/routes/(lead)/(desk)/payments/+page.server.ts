import { guardPage, LEADS } from '$lib/server/auth/guards';
import { actorOf } from '$lib/server/auth/types';
import { listPayments, paymentTotals } from '$lib/server/payments/service';

export async function load(event) {
	const user = guardPage(event, LEADS);
	const page = Math.max(1, Math.min(10_000, Number(event.url.searchParams.get('page')) || 1));
	return {
		title: 'Payments',
		list: await listPayments(actorOf(user), page),
		totals: await paymentTotals(user.workshopId)
	};
}
