import { guardPage } from '$lib/server/auth/guards';
import { actorOf } from '$lib/server/auth/types';
import { readComponent } from '$lib/server/services/components';
import { orNotFound } from '../../load.server';

export async function load(event) {
	const user = guardPage(event);
	const id = event.params.componentId;
	return orNotFound(id, () => readComponent(actorOf(user), id));
}
