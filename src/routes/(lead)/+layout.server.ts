import { guardPage, LEADS } from '$lib/server/auth/guards';
import { actorOf } from '$lib/server/auth/types';
import { countOpen } from '$lib/server/sync/conflicts';

export async function load(event) {
	const user = guardPage(event, LEADS);
	return { user, openClashes: await countOpen(actorOf(user)) };
}
