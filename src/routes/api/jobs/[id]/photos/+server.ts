import { z } from 'zod';
import { api } from '$lib/server/api';
import { actorOf } from '$lib/server/auth/types';
import { NotFoundError } from '$lib/server/errors';
import { jobPhotos } from '$lib/server/photos/service';

/** GET /api/jobs/:id/photos → `{ photos }`: the job's photos that are not removed, oldest first. */
export const GET = api(async ({ params }, user) => {
	if (!z.uuid().safeParse(params.id).success) throw new NotFoundError('Job');
	return { photos: await jobPhotos(actorOf(user), params.id!) };
});
