import { z } from 'zod';
import { api } from '$lib/server/api';
import { actorOf } from '$lib/server/auth/types';
import { NotFoundError } from '$lib/server/errors';
import { oneTest } from '$lib/server/services/test-display';

/** GET /api/tests/:id → `{ jobId, test, sparks, swaps }` (leads: any test of the workshop). */
export const GET = api(async ({ params }, user) => {
	if (!z.uuid().safeParse(params.id).success) throw new NotFoundError('Test');
	return oneTest(actorOf(user), params.id!);
});
