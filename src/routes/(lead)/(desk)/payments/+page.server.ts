import { guardPage, LEADS } from '$lib/server/auth/guards';
import { paymentTotals } from '$lib/server/payments/service';

/** The totals; the list itself comes from GET /api/payments (sorted and paged by the URL). */
export async function load(event) {
	const user = guardPage(event, LEADS);
	return { title: 'Payments', totals: await paymentTotals(user.workshopId) };
}
