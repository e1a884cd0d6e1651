import { api, readJson } from '$lib/server/api';
import { actorOf } from '$lib/server/auth/types';
import { queryObject } from '$lib/schemas/common';
import { createComponent, listComponents } from '$lib/server/services/components';

/** GET /api/components?q=&kind=&sheets=&sort=&page=&pageSize= → { items, total, page, pageSize } */
export const GET = api(async ({ url }, user) =>
	listComponents(actorOf(user), queryObject(url.searchParams))
);

/** POST /api/components { partNumber, kind, … } → 201 { component } (anyone in the workshop) */
export const POST = api(async ({ request }, user) => {
	const component = await createComponent(actorOf(user), await readJson(request));
	return Response.json({ component }, { status: 201 });
});
