import { queryObject } from '$lib/schemas/common';
import { api } from '$lib/server/api';
import { LEADS } from '$lib/server/auth/guards';
import { actorOf } from '$lib/server/auth/types';
import { parseOverviewQuery, readOverview } from '$lib/server/services/overview';

/**
 * GET /api/overview?from=&to=&part=&meter=&role=&partsSort=&metersSort=&peopleSort= →
 * `{ from, to, bucket, parts, meters, leadZero, people }` (leads and owners).
 */
export const GET = api(
	async ({ url }, user) =>
		readOverview(actorOf(user), parseOverviewQuery(queryObject(url.searchParams))),
	{ roles: LEADS }
);
