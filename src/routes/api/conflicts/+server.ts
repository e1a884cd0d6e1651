import { api } from '$lib/server/api';
import { LEADS } from '$lib/server/auth/guards';
import { actorOf } from '$lib/server/auth/types';
import { listOpen } from '$lib/server/sync/conflicts';

/** GET /api/conflicts → the workshop's open conflicts (leads and owners). */
export const GET = api(async (_e, user) => ({ items: await listOpen(actorOf(user)) }), { roles: LEADS });
