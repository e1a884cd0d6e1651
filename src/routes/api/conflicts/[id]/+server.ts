import { z } from 'zod';
import { api, readJson } from '$lib/server/api';
import { LEADS } from '$lib/server/auth/guards';
import { actorOf } from '$lib/server/auth/types';
import { NotFoundError } from '$lib/server/errors';
import { settle } from '$lib/server/sync/conflicts';

/** POST /api/conflicts/:id → settle: `{ pick: 'server' | 'candidate', deviceId } | { pick: 'value', value }`. */
export const POST = api(
	async ({ params, request }, user) => {
		if (!z.uuid().safeParse(params.id).success) throw new NotFoundError('Conflict');
		return settle(actorOf(user), params.id!, await readJson(request));
	},
	{ roles: LEADS }
);
