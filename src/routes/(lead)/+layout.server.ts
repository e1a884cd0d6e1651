import { guardPage, LEADS } from '$lib/server/auth/guards';
import { navCounts } from '$lib/server/nav';

/** The lead's desk: workshop leads and owners only (every action checks again). */
export async function load(event) {
	const user = guardPage(event, LEADS);
	return { user, navCounts: await navCounts(user) };
}
