import { api, readJson } from '$lib/server/api';
import { actorOf } from '$lib/server/auth/types';
import * as jobs from '$lib/server/services/jobs';
import { idParam } from '$lib/server/versioned';

/** POST /api/jobs/:id/status { status, baseVersion } → { job, history } */
export const POST = api(async ({ params, request }, user) => {
	const id = idParam(params.id, 'Job');
	const actor = actorOf(user);
	const job = await jobs.changeStatus(actor, id, await readJson(request));
	return { job, history: await jobs.statusHistory(actor, id) };
});
