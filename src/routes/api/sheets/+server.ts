import { api, readJson } from '$lib/server/api';
import { actorOf } from '$lib/server/auth/types';
import { queryObject } from '$lib/schemas/common';
import { createDraft, listSheets } from '$lib/server/services/sheets';

/** GET /api/sheets?componentId=&state=&sort=&page=&pageSize= → { items, total, page, pageSize } */
export const GET = api(async ({ url }, user) =>
	listSheets(actorOf(user), queryObject(url.searchParams))
);

/** POST /api/sheets { componentId, checks, source } → 201 { sheet } (a draft, the next version) */
export const POST = api(async ({ request }, user) => {
	const sheet = await createDraft(actorOf(user), await readJson(request));
	return Response.json({ sheet }, { status: 201 });
});
