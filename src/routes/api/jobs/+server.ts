import { api, readJson } from '$lib/server/api';
import { actorOf } from '$lib/server/auth/types';
import { queryObject } from '$lib/schemas/common';
import * as jobs from '$lib/server/services/jobs';

/**
 * GET /api/jobs?q=&status=&assignee=&vehicle=&customer=&from=&to=&sort=&page=&pageSize=
 * → { items, total, page, pageSize }. Without a query: the caller's open jobs, newest first
 * (assigned ones for technicians and apprentices, the whole workshop for leads and owners).
 */
export const GET = api(async ({ url }, user) =>
	jobs.searchJobs(actorOf(user), queryObject(url.searchParams))
);

/** POST /api/jobs { complaint, customerId?, vehicleId?, location?, assigneeId?, … } → 201 { job } */
export const POST = api(async ({ request }, user) => {
	const job = await jobs.addJob(actorOf(user), await readJson(request));
	return Response.json({ job }, { status: 201 });
});
