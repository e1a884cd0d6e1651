import { guardPage } from '$lib/server/auth/guards';
import { actorOf } from '$lib/server/auth/types';
import { seesAllJobs } from '$lib/server/services/access';
import { listAssignable } from '$lib/server/services/jobs';

/** The table itself is fetched from /api/jobs in the browser; this loads the filter choices. */
export async function load(event) {
	const actor = actorOf(guardPage(event));
	const lead = seesAllJobs(actor);
	return { title: 'Jobs', lead, assignees: lead ? await listAssignable(actor) : [] };
}
