import { api, readJson } from '$lib/server/api';
import { actorOf } from '$lib/server/auth/types';
import { readComponent, updateComponent } from '$lib/server/services/components';
import { idParam, splitBaseVersion } from '$lib/server/versioned';

/** GET /api/components/:id → { component, sheets } (404 across workshops) */
export const GET = api(async ({ params }, user) =>
	readComponent(actorOf(user), idParam(params.id, 'Component'))
);

/** PATCH /api/components/:id { baseVersion, ...fields } → { component } (409 with `current` when stale) */
export const PATCH = api(async ({ params, request }, user) => {
	const id = idParam(params.id, 'Component');
	const { baseVersion, fields } = splitBaseVersion(await readJson(request));
	return { component: await updateComponent(actorOf(user), id, baseVersion, fields) };
});
