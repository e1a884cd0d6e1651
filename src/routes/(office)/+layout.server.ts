import { guardPage } from '$lib/server/auth/guards';

/** Jobs, customers and vehicles: any signed-in member of the workshop (roles are checked per action). */
export function load(event) {
	return { user: guardPage(event) };
}
