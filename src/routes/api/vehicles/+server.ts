import { api, readJson } from '$lib/server/api';
import { actorOf } from '$lib/server/auth/types';
import { queryObject } from '$lib/schemas/common';
import { addVehicle, searchVehicles } from '$lib/server/services/vehicles';
import { splitJobId } from '$lib/server/versioned';

/** GET /api/vehicles?q=&customer=&hybrid=&sort=&page=&pageSize= → { items, total, page, pageSize } */
export const GET = api(async ({ url }, user) =>
	searchVehicles(actorOf(user), queryObject(url.searchParams))
);

/** POST /api/vehicles { ...fields, jobId? } → 201 { vehicle, warnings } */
export const POST = api(async ({ request }, user) => {
	const { jobId, fields } = splitJobId(await readJson(request));
	return Response.json(await addVehicle(actorOf(user), fields, { jobId }), { status: 201 });
});
