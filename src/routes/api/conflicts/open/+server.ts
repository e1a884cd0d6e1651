import { z } from 'zod';
import { api } from '$lib/server/api';
import { actorOf } from '$lib/server/auth/types';
import { ValidationError } from '$lib/server/errors';
import { stillOpen } from '$lib/server/sync/conflicts';

const ids = z
	.string()
	.transform((s) => s.split(',').filter(Boolean))
	.pipe(z.array(z.uuid('Not a clash id')).max(100, 'At most 100 ids'));

/**
 * GET /api/conflicts/open?ids=a,b → `{ open: [...] }`: which of these clashes still wait for
 * the lead (any member: a phone asks about the clashes its own edits made).
 */
export const GET = api(async ({ url }, user) => {
	const r = ids.safeParse(url.searchParams.get('ids') ?? '');
	if (!r.success) throw ValidationError.fromZod(r.error, 'ids');
	return { open: await stillOpen(actorOf(user), r.data) };
});
