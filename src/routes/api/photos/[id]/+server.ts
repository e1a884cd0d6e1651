import { api } from '$lib/server/api';
import { actorOf } from '$lib/server/auth/types';
import { MAX_PHOTO_BYTES } from '$lib/photos/marks';
import { PhotoTooLargeError, photoLinks, uploadPhoto } from '$lib/server/photos/service';

/**
 * PUT /api/photos/:id?jobId=&testId=&readingId=&caption=&sha256=&deviceTime= with the photo's
 * bytes as the body → 201 `{ photo }` (200 when this photo was already stored). 413 over
 * 10 MB, 415 not a JPEG, PNG or WebP by its content, 400 `checksum_mismatch`, 404 a job the
 * user may not open. See `src/lib/server/photos/service.ts`.
 */
export const PUT = api(async ({ params, request, url }, user) => {
	const declared = Number(request.headers.get('content-length'));
	if (declared > MAX_PHOTO_BYTES) throw new PhotoTooLargeError();
	const bytes = Buffer.from(await request.arrayBuffer());
	if (bytes.length > MAX_PHOTO_BYTES) throw new PhotoTooLargeError();
	const device = request.headers.get('x-device-id');
	const actor = actorOf(user, device && /^[\w-]{1,64}$/.test(device) ? device : 'web');
	const { photo, created } = await uploadPhoto(actor, params.id!, Object.fromEntries(url.searchParams), bytes);
	return Response.json({ photo }, { status: created ? 201 : 200 });
});

/**
 * GET /api/photos/:id → `{ url, thumbUrl, expiresAt }`: short-lived download addresses
 * (PHOTO_URL_SECONDS), for members of the owning workshop who may open the job; 404 otherwise.
 */
export const GET = api(async ({ params }, user) => {
	return photoLinks(actorOf(user), params.id!);
});
