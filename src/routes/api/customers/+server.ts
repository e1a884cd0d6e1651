import { api, readJson } from '$lib/server/api';
import { actorOf } from '$lib/server/auth/types';
import { queryObject } from '$lib/schemas/common';
import * as customers from '$lib/server/services/customers';
import { splitJobId } from '$lib/server/versioned';

/** GET /api/customers?q=&consent=&sort=&page=&pageSize= → { items, total, page, pageSize } */
export const GET = api(async ({ url }, user) =>
	customers.searchCustomers(actorOf(user), queryObject(url.searchParams))
);

/** POST /api/customers { ...fields, jobId? } → 201 { customer } */
export const POST = api(async ({ request }, user) => {
	const { jobId, fields } = splitJobId(await readJson(request));
	const customer = await customers.addCustomer(actorOf(user), fields, { jobId });
	return Response.json({ customer }, { status: 201 });
});
