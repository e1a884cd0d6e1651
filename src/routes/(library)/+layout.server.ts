import { isLead } from '$lib/roles';
import { guardPage } from '$lib/server/auth/guards';
import { navCounts } from '$lib/server/nav';

/** The parts library: every role of the workshop reads it and proposes drafts (DESIGN §6). */
export async function load(event) {
	const user = guardPage(event);
	return { user, isLead: isLead(user), navCounts: await navCounts(user) };
}
