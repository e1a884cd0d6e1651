import { queryObject } from '$lib/schemas/common';
import { guardPage, LEADS } from '$lib/server/auth/guards';
import { actorOf } from '$lib/server/auth/types';
import { ValidationError } from '$lib/server/errors';
import { parseOverviewQuery, readOverview } from '$lib/server/services/overview';
import { paymentTotals } from '$lib/server/payments/service';

/** The overview for the URL's query; a wrong query shows its message over the default view. */
export async function load(event) {
	const actor = actorOf(guardPage(event, LEADS));
	const params = queryObject(event.url.searchParams);
	const money = await paymentTotals(actor.workshopId);
	try {
		const query = parseOverviewQuery(params);
		return { title: 'Overview', query, overview: await readOverview(actor, query), problems: null, money };
	} catch (e) {
		if (!(e instanceof ValidationError)) throw e;
		const query = parseOverviewQuery({});
		return {
			title: 'Overview',
			query,
			overview: await readOverview(actor, query),
			problems: e.fields,
			money
		};
	}
}
