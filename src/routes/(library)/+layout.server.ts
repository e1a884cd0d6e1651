import { isLead } from '$lib/roles';
import { guardPage } from '$lib/server/auth/guards';

/** The spec library: every role of the workshop reads it and proposes drafts (DESIGN §6). */
export function load(event) {
	const user = guardPage(event);
	return { user, isLead: isLead(user) };
}
