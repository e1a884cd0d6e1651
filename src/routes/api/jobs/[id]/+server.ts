import { api } from '$lib/server/api';
import { actorOf } from '$lib/server/auth/types';
import { NotFoundError } from '$lib/server/errors';
import * as jobs from '$lib/server/services/jobs';
import { z } from 'zod';

/** GET /api/jobs/:id → one job with customer and vehicle (404 across workshops). */
export const GET = api(async ({ params }, user) => {
	if (!z.uuid().safeParse(params.id).success) throw new NotFoundError('Job');
	return { job: await jobs.readOne(actorOf(user), params.id!) };
});
