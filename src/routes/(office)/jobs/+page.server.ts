import { guardPage } from '$lib/server/auth/guards';
import { actorOf } from '$lib/server/auth/types';
import { isLead } from '$lib/roles';
import { listAssignable } from '$lib/server/services/jobs';

/** The table itself is fetched from /api/jobs in the browser; this loads the filter choices. */
export async function load(event) {
	const actor = actorOf(guardPage(event));
	const lead = isLead(actor);
	return { title: 'Jobs', lead, assignees: lead ? await listAssignable(actor) : [] };
}
