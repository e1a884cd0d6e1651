import { api } from '$lib/server/api';
import { actorOf } from '$lib/server/auth/types';
import { photoFile } from '$lib/server/photos/service';

/**
 * GET /api/photos/:id/file?size=thumb|full → the photo's bytes (thumbnail by default), for
 * the pages' `<img>` (same origin, so the pages' content policy stays as it is). Members of
 * the owning workshop who may open the job; 404 otherwise.
 */
export const GET = api(async ({ params, url }, user) => {
	const size = url.searchParams.get('size') === 'full' ? 'full' : 'thumb';
	const { body, type } = await photoFile(actorOf(user), params.id!, size);
	return new Response(new Uint8Array(body), {
		headers: { 'content-type': type, 'cache-control': 'private, max-age=3600' }
	});
});
