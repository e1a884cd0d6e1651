import { queryObject } from '$lib/schemas/common';
import { api } from '$lib/server/api';
import { LEADS } from '$lib/server/auth/guards';
import { actorOf } from '$lib/server/auth/types';
import { parseOverviewQuery, readOverview } from '$lib/server/services/overview';

/**
 * GET /api/overview?from=&to=&part=&meter=&role=&partsSort=&metersSort=&peopleSort=&circuitsSort= →
 * `{ from, to, bucket, parts, meters, leadZero, people, circuits }` (leads and owners; `circuits`:
 * battery, charging and other circuit tests per kind).
 */
export const GET = api(
	async ({ url }, user) =>
		readOverview(actorOf(user), parseOverviewQuery(queryObject(url.searchParams))),
	{ roles: LEADS }
);
