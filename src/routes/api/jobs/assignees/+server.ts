import { api } from '$lib/server/api';
import { actorOf } from '$lib/server/auth/types';
import * as jobs from '$lib/server/services/jobs';

/** GET /api/jobs/assignees → { items: [{ id, name, role }] }: who a job can be assigned to. */
export const GET = api(async (_event, user) => ({
	items: await jobs.listAssignable(actorOf(user))
}));
