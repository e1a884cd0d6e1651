import { z } from 'zod';
import { api, readJson } from '$lib/server/api';
import { actorOf } from '$lib/server/auth/types';
import { NotFoundError } from '$lib/server/errors';
import { decideTest } from '$lib/server/services/signoffs';

/**
 * POST /api/tests/:id/signoff `{ decision?: 'signed' | 'sent_back', note?, mode?: 'remote' |
 * 'witnessed' }` → 201 `{ signoff }`. Leads and owners, on a test or a circuit test (battery,
 * charging, …; `:id` the circuit test's id) an apprentice did; the
 * signer is the signed-in user. A send-back needs its note (400); 403 with the reason.
 */
export const POST = api(async ({ params, request }, user) => {
	if (!z.uuid().safeParse(params.id).success) throw new NotFoundError('Test');
	const signoff = await decideTest(actorOf(user), params.id!, await readJson(request));
	return Response.json({ signoff }, { status: 201 });
});
