import { api, readJson } from '$lib/server/api';
import { actorOf } from '$lib/server/auth/types';
import { markPhoto } from '$lib/server/photos/service';

/**
 * POST /api/photos/:id/marks `{ mark: 'removed' | 'for_customer' | 'not_for_customer' }` →
 * 201 `{ mark }`. The person who took the photo or a lead; 404 for a photo the user may not see.
 */
export const POST = api(async ({ params, request }, user) => {
	const mark = await markPhoto(actorOf(user), params.id!, await readJson(request));
	return Response.json({ mark }, { status: 201 });
});
