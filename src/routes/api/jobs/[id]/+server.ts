import { api, readJson } from '$lib/server/api';
import { actorOf } from '$lib/server/auth/types';
import * as jobs from '$lib/server/services/jobs';
import { idParam, splitBaseVersion } from '$lib/server/versioned';

/** GET /api/jobs/:id → { job, history } (404 across workshops or for a job not assigned to you) */
export const GET = api(async ({ params }, user) => {
	const id = idParam(params.id, 'Job');
	const actor = actorOf(user);
	return { job: await jobs.readOne(actor, id), history: await jobs.statusHistory(actor, id) };
});

/** PATCH /api/jobs/:id { baseVersion, ...fields } → { job } (409 with `current` when stale) */
export const PATCH = api(async ({ params, request }, user) => {
	const id = idParam(params.id, 'Job');
	const { baseVersion, fields } = splitBaseVersion(await readJson(request));
	return { job: await jobs.editJob(actorOf(user), id, baseVersion, fields) };
});
