import { z } from 'zod';
import { api } from '$lib/server/api';
import { actorOf } from '$lib/server/auth/types';
import { NotFoundError } from '$lib/server/errors';
import { jobTests } from '$lib/server/services/test-display';

/** GET /api/jobs/:id/tests → `{ tests, sparks, swaps }` as the job pages show them. */
export const GET = api(async ({ params }, user) => {
	if (!z.uuid().safeParse(params.id).success) throw new NotFoundError('Job');
	return jobTests(actorOf(user), params.id!);
});
