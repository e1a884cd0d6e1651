import { guardPage } from '$lib/server/auth/guards';
import { navCounts } from '$lib/server/nav';

/** Jobs, customers and vehicles: any signed-in member of the workshop (roles are checked per action). */
export async function load(event) {
	const user = guardPage(event);
	return { user, navCounts: await navCounts(user) };
}
