import { api, jsonText } from '$lib/server/api';
import { NotFoundError } from '$lib/server/errors';
import { jobOnDemand } from '$lib/server/sync/pull';
import { uuidSchema } from '$lib/sync/protocol';

/** GET /api/sync/jobs/:id → { changes }: one job and everything under it, for a phone that does not keep it. */
export const GET = api(async ({ params, request }, user) => {
	const id = uuidSchema.safeParse(params.id);
	if (!id.success) throw new NotFoundError();
	return jsonText(request, await jobOnDemand(user, id.data));
});
