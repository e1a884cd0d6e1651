import { guardPage, LEADS } from '$lib/server/auth/guards';

export function load(event) {
	const user = guardPage(event, LEADS);
	return { user };
}
