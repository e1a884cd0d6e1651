import { guardPage } from '$lib/server/auth/guards';
import { actorOf, isLead } from '$lib/server/auth/types';
import { countOpen } from '$lib/server/sync/conflicts';

/** Jobs, customers and vehicles: any signed-in member of the workshop (roles are checked per action). */
export async function load(event) {
	const user = guardPage(event);
	return { user, openClashes: isLead(user) ? await countOpen(actorOf(user)) : null };
}
