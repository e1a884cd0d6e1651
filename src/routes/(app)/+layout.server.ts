import { guardPage } from '$lib/server/auth/guards';

export function load(event) {
	const user = guardPage(event);
	return { user };
}
