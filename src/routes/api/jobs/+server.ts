import { api } from '$lib/server/api';
import { actorOf } from '$lib/server/auth/types';
import * as jobs from '$lib/server/services/jobs';

/** GET /api/jobs → the caller's open jobs (assigned ones; the whole workshop for leads). */
export const GET = api(async (_event, user) => ({ items: await jobs.listOpen(actorOf(user)) }));
