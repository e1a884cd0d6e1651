import { api, readJson } from '$lib/server/api';
import { actorOf } from '$lib/server/auth/types';
import { editVehicle, readVehicle } from '$lib/server/services/vehicles';
import { idParam, splitBaseVersion } from '$lib/server/versioned';

/** GET /api/vehicles/:id → { vehicle, warnings } (404 across workshops) */
export const GET = api(async ({ params }, user) =>
	readVehicle(actorOf(user), idParam(params.id, 'Vehicle'))
);

/** PATCH /api/vehicles/:id { baseVersion, ...fields } → { vehicle, warnings } */
export const PATCH = api(async ({ params, request }, user) => {
	const id = idParam(params.id, 'Vehicle');
	const { baseVersion, fields } = splitBaseVersion(await readJson(request));
	return editVehicle(actorOf(user), id, baseVersion, fields);
});
