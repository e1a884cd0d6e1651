import { api, readJson } from '$lib/server/api';
import { actorOf } from '$lib/server/auth/types';
import * as customers from '$lib/server/services/customers';
import { idParam, splitBaseVersion } from '$lib/server/versioned';

/** GET /api/customers/:id → { customer } (404 across workshops) */
export const GET = api(async ({ params }, user) => ({
	customer: await customers.read(actorOf(user), idParam(params.id, 'Customer'))
}));

/** PATCH /api/customers/:id { baseVersion, ...fields } → { customer } (409 with `current` when stale) */
export const PATCH = api(async ({ params, request }, user) => {
	const id = idParam(params.id, 'Customer');
	const { baseVersion, fields } = splitBaseVersion(await readJson(request));
	return { customer: await customers.editCustomer(actorOf(user), id, baseVersion, fields) };
});
